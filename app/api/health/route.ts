import { NextResponse } from 'next/server';
import { db } from '@/db/knex';
import { ping } from '@/storage/s3';

export const dynamic = 'force-dynamic';

// Public on purpose (load balancers call it); it reveals only up/down.
export async function GET() {
  const [database, objectStore] = await Promise.all([
    db.raw('select 1').then(() => 'up' as const, () => 'down' as const),
    ping().then((ok) => (ok ? ('up' as const) : ('down' as const))),
  ]);
  const ok = database === 'up' && objectStore === 'up';
  return NextResponse.json({ status: ok ? 'ok' : 'degraded', database, objectStore }, { status: ok ? 200 : 503 });
}
