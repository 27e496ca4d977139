import 'server-only';
import { db } from '@/db/knex';

export async function getLabOverview() {
  const since = new Date(Date.now() - 30 * 864e5);
  const [stallions, clients, recent] = await Promise.all([
    db('stallions').count<{ n: number }[]>({ n: '*' }).first(),
    db('clients').count<{ n: number }[]>({ n: '*' }).first(),
    db('collections').where('collected_at', '>=', since).count<{ n: number }[]>({ n: '*' }).first(),
  ]);
  return { stallions: Number(stallions?.n ?? 0), clients: Number(clients?.n ?? 0), collectionsLast30Days: Number(recent?.n ?? 0) };
}

/** Collections with field images whose first read is not yet submitted: the technicians' worklist. */
export async function collectionsAwaitingRead(limit = 10) {
  const rows = await db('collections as k')
    .join('stallions as s', 's.id', 'k.stallion_id')
    .leftJoin('reads as r', function () {
      this.on('r.collection_id', 'k.id').andOn('r.kind', db.raw('?', ['first']));
    })
    .whereExists(db('field_images as i').whereRaw('i.collection_id = k.id'))
    .where((w) => w.whereNull('r.id').orWhere('r.status', 'open'))
    .orderBy('k.collected_at', 'desc')
    .limit(limit)
    .select('k.id', 'k.collected_at', 's.name as stallion', 'r.status', db.raw('(select count(*) from field_images i where i.collection_id = k.id) as images'));
  return rows.map((r) => ({ id: r.id as number, collectedAt: new Date(r.collected_at).toISOString(), stallion: r.stallion as string, started: r.status === 'open', images: Number(r.images) }));
}
