import type { Knex } from 'knex';

/*
 * Marks stop storing `counts_as_sperm` and `is_normal`. Both were copies of the read's class-set
 * snapshot taken when the mark was written, and a list summed them while other screens read the
 * snapshot: two ways to total a read that could disagree. Every total now comes from the snapshot
 * through the morphology engine. Down puts the columns back, worked out from each read's snapshot.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('marks', (t) => {
    t.dropColumn('counts_as_sperm');
    t.dropColumn('is_normal');
  });
}

type SnapshotClass = { key: string; group: string; countsAsSperm: boolean };

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('marks', (t) => {
    t.boolean('counts_as_sperm').notNullable().defaultTo(false);
    t.boolean('is_normal').notNullable().defaultTo(false);
  });
  const reads: { id: number; class_set_snapshot: unknown }[] = await knex('reads').select('id', 'class_set_snapshot');
  for (const r of reads) {
    const snap = typeof r.class_set_snapshot === 'string' ? JSON.parse(r.class_set_snapshot) : r.class_set_snapshot;
    const classes = (snap?.classes ?? []) as SnapshotClass[];
    const sperm = classes.filter((c) => c.countsAsSperm).map((c) => c.key);
    const normal = classes.filter((c) => c.countsAsSperm && c.group === 'normal').map((c) => c.key);
    if (sperm.length) await knex('marks').where('read_id', r.id).whereIn('class_key', sperm).update({ counts_as_sperm: true });
    if (normal.length) await knex('marks').where('read_id', r.id).whereIn('class_key', normal).update({ is_normal: true });
  }
}
