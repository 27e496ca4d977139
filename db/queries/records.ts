import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/db/knex';
import { notFound } from '@/lib/api/errors';

/** Parents that routes name in their address (a collection's images, a stallion's measurements). */
const RECORDS = { collections: 'The collection', stallions: 'The stallion' } as const;

/**
 * 404 unless the record exists: a list under a record that does not exist is an unknown address,
 * not an empty list, and a change under it must not run (nor be audited) at all.
 */
export async function requireRecord(table: keyof typeof RECORDS, id: number, trx: Knex | Knex.Transaction = db): Promise<void> {
  if (!(await trx(table).where({ id }).first('id'))) throw notFound(RECORDS[table]);
}
