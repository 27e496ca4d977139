import 'server-only';
import type { Knex } from 'knex';
import { labDayKey } from '@/lib/time/lab-time';

/** Renumbers every collection by the lab's days: after the lab's time zone changes. */
export async function renumberAllDays(trx: Knex.Transaction, timeZone: string): Promise<number> {
  const rows: { id: number; stallion_id: number; collected_at: Date; number_that_day: number }[] = await trx('collections')
    .orderBy('stallion_id')
    .orderBy('collected_at')
    .orderBy('id')
    .select('id', 'stallion_id', 'collected_at', 'number_that_day');
  let changed = 0;
  let lastKey = '';
  let n = 0;
  for (const r of rows) {
    const key = `${r.stallion_id}|${labDayKey(new Date(r.collected_at), timeZone)}`;
    n = key === lastKey ? n + 1 : 1;
    lastKey = key;
    if (r.number_that_day !== n) {
      await trx('collections').where({ id: r.id }).update({ number_that_day: n });
      changed++;
    }
  }
  return changed;
}
