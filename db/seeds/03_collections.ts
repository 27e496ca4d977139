import type { Knex } from 'knex';
import { DEMO_RECORDERS, DEMO_STALLIONS, buildDemoCollections } from '../../lib/demo/scenario';

// Re-runnable: collections are matched by (stallion, collected_at); only missing ones are
// inserted, nothing is updated or deleted.
export async function seed(knex: Knex): Promise<void> {
  await knex.transaction(async (trx) => {
    const recorder = await trx('users').where({ email: DEMO_RECORDERS.collections }).first('id');
    if (!recorder) throw new Error(`demo user ${DEMO_RECORDERS.collections} is missing: run seed 01 first`);

    const stallionIds = new Map<string, number>();
    for (const s of DEMO_STALLIONS) {
      const row = await trx('stallions').where({ registration: s.registration }).first('id');
      if (!row) throw new Error(`demo stallion ${s.name} is missing: run seed 02 first`);
      stallionIds.set(s.registration, row.id);
    }

    const existing = new Set<string>();
    const rows = await trx('collections')
      .whereIn('stallion_id', [...stallionIds.values()])
      .select<{ stallion_id: number; collected_at: Date }[]>('stallion_id', 'collected_at');
    for (const r of rows) existing.add(`${r.stallion_id}@${new Date(r.collected_at).getTime()}`);

    const missing = buildDemoCollections()
      .map((c) => ({ c, stallionId: stallionIds.get(c.stallionRegistration)! }))
      .filter(({ c, stallionId }) => !existing.has(`${stallionId}@${c.collectedAt.getTime()}`))
      .map(({ c, stallionId }) => ({
        stallion_id: stallionId,
        collected_at: c.collectedAt,
        number_that_day: c.numberThatDay,
        volume_ml: c.volumeMl,
        concentration_m_per_ml: c.concentrationMPerMl,
        concentration_method: 'entered',
        total_motility_pct: c.totalMotilityPct,
        progressive_motility_pct: c.progressiveMotilityPct,
        preparation: c.preparation,
        optics: c.optics,
        magnification: c.magnification,
        collected_by: c.collectedBy,
        recorded_by: recorder.id,
        remarks: c.remarks,
      }));
    for (let i = 0; i < missing.length; i += 100) {
      await trx('collections').insert(missing.slice(i, i + 100));
    }
  });
}
