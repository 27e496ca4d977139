import type { Knex } from 'knex';
import { DEMO_RECORDERS, DEMO_STALLIONS, buildDemoTestisMeasurements } from '../../lib/demo/scenario';

// Re-runnable: measurements are matched by (stallion, measured_on); only missing ones are inserted.
export async function seed(knex: Knex): Promise<void> {
  const recorder = await knex('users').where({ email: DEMO_RECORDERS.testis }).first('id');
  if (!recorder) throw new Error(`demo user ${DEMO_RECORDERS.testis} is missing: run seed 01 first`);

  const stallionIds = new Map<string, number>();
  for (const s of DEMO_STALLIONS) {
    const row = await knex('stallions').where({ registration: s.registration }).first('id');
    if (!row) throw new Error(`demo stallion ${s.name} is missing: run seed 02 first`);
    stallionIds.set(s.registration, row.id);
  }

  await knex.transaction(async (trx) => {
    for (const m of buildDemoTestisMeasurements()) {
      const stallionId = stallionIds.get(m.stallionRegistration)!;
      // A 'YYYY-MM-DD' string compares as a DATE, with no time zone in the way.
      const existing = await trx('testis_measurements')
        .where({ stallion_id: stallionId, measured_on: m.measuredOn })
        .first('id');
      if (existing) continue;
      await trx('testis_measurements').insert({
        stallion_id: stallionId,
        measured_on: m.measuredOn,
        method: m.method,
        left_length_cm: m.leftLengthCm,
        left_width_cm: m.leftWidthCm,
        left_height_cm: m.leftHeightCm,
        right_length_cm: m.rightLengthCm,
        right_width_cm: m.rightWidthCm,
        right_height_cm: m.rightHeightCm,
        total_width_cm: m.totalWidthCm,
        recorded_by: recorder.id,
        notes: m.notes,
      });
    }
  });
}
