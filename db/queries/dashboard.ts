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
