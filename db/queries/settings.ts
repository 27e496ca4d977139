import 'server-only';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { renumberAllDays } from '@/db/queries/collection-days';
import type { CurrentUser } from '@/lib/auth/session';
import { mergeLabSettings, type LabSettings } from '@/lib/settings/lab-settings';

const KEY = 'lab';

export async function getLabSettings(): Promise<LabSettings> {
  const row = await db('lab_settings').where({ key: KEY }).first();
  return mergeLabSettings(row ? (typeof row.value === 'string' ? JSON.parse(row.value) : row.value) : null);
}

export async function updateLabSettings(actor: CurrentUser, values: LabSettings): Promise<LabSettings> {
  return db.transaction(async (trx) => {
    const row = await trx('lab_settings').where({ key: KEY }).forUpdate().first();
    const before = mergeLabSettings(row ? (typeof row.value === 'string' ? JSON.parse(row.value) : row.value) : null);
    await trx('lab_settings')
      .insert({ key: KEY, value: JSON.stringify(values), updated_by: actor.id, updated_at: trx.fn.now(3) })
      .onConflict('key')
      .merge();
    // "Ejaculate of the day" follows the lab's days: a new time zone renumbers them.
    if (values.timeZone !== before.timeZone) await renumberAllDays(trx, values.timeZone);
    await writeAudit(trx, { userId: actor.id, action: 'settings', entity: 'lab_settings', entityId: KEY, before, after: values });
    return values;
  });
}
