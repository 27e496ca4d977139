import type { Knex } from 'knex';

/*
 * Several reads of one kind per collection: a recount (a further second read) is started when the
 * first two reads differ by more than the acceptable difference, and every read is kept. The
 * one-read-per-kind unique index goes; an index on collection_id stays for the foreign key.
 * A read's number is its place (by id) among its collection's reads (lib/reads/kinds.ts
 * numberReads), so nothing new is stored and rows written by any code path are numbered alike.
 *
 * Down puts the unique index back, which only works while no collection holds two reads of one
 * kind: it refuses, naming them, rather than deleting anyone's read.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('reads', (t) => {
    t.index(['collection_id'], 'reads_collection_id_index');
  });
  await knex.schema.alterTable('reads', (t) => {
    t.dropUnique(['collection_id', 'kind']);
  });
}

export async function down(knex: Knex): Promise<void> {
  const doubled: { collection_id: number; kind: string }[] = await knex('reads').groupBy('collection_id', 'kind').havingRaw('count(*) > 1').select('collection_id', 'kind');
  if (doubled.length > 0) {
    const list = doubled.map((d) => `collection ${d.collection_id} (${d.kind})`).join(', ');
    throw new Error(`Cannot restore one read per kind: ${list} hold several reads of one kind. Nothing was changed.`);
  }
  await knex.schema.alterTable('reads', (t) => {
    t.unique(['collection_id', 'kind']);
  });
  await knex.schema.alterTable('reads', (t) => {
    t.dropIndex(['collection_id'], 'reads_collection_id_index');
  });
}
