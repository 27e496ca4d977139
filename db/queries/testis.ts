import 'server-only';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { notFound } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import type { TestisValues } from '@/lib/validations/collection';

export type TestisMeasurement = TestisValues & { id: number; stallionId: number; recordedBy: string };

const DIMS = ['leftLengthCm', 'leftWidthCm', 'leftHeightCm', 'rightLengthCm', 'rightWidthCm', 'rightHeightCm', 'totalWidthCm'] as const;
const col = (k: string) => k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);

export async function listTestisMeasurements(stallionId: number): Promise<TestisMeasurement[]> {
  const rows = await db('testis_measurements as t').join('users as u', 'u.id', 't.recorded_by').where('t.stallion_id', stallionId).orderBy('t.measured_on', 'desc').select('t.*', 'u.name as recorded_by_name');
  return rows.map((r) => ({
    id: r.id,
    stallionId: r.stallion_id,
    measuredOn: String(r.measured_on).slice(0, 10),
    method: r.method,
    ...Object.fromEntries(DIMS.map((d) => [d, r[col(d)]])),
    notes: r.notes,
    recordedBy: r.recorded_by_name,
  })) as TestisMeasurement[];
}

export async function createTestisMeasurement(actor: CurrentUser, stallionId: number, v: TestisValues): Promise<{ id: number }> {
  return db.transaction(async (trx) => {
    if (!(await trx('stallions').where({ id: stallionId }).first())) throw notFound('The stallion');
    const row = { stallion_id: stallionId, measured_on: v.measuredOn, method: v.method, ...Object.fromEntries(DIMS.map((d) => [col(d), v[d] ?? null])), notes: v.notes ?? null, recorded_by: actor.id };
    const [id] = await trx('testis_measurements').insert(row);
    await writeAudit(trx, { userId: actor.id, action: 'create', entity: 'testis_measurement', entityId: id, after: row });
    return { id };
  });
}
