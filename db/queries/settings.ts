import 'server-only';
import type { Knex } from 'knex';
import { cache } from 'react';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { renumberAllDays } from '@/db/queries/collection-days';
import type { CurrentUser } from '@/lib/auth/session';
import { mergeLabSettings, type LabSettings } from '@/lib/settings/lab-settings';

const KEY = 'lab';

const stored = (row: { value: unknown } | undefined) => mergeLabSettings(row ? (typeof row.value === 'string' ? JSON.parse(row.value) : row.value) : null);

/** The lab's settings; read once per page render however many components ask. */
export const getLabSettings = cache(async (): Promise<LabSettings> => stored(await db('lab_settings').where({ key: KEY }).first()));

/**
 * The lab's time zone inside a write that counts days by it, under a shared lock: a change
 * of zone (which renumbers every day) waits for the write, or the write for it.
 */
export async function labTimeZoneFor(trx: Knex.Transaction): Promise<string> {
  return stored(await trx('lab_settings').where({ key: KEY }).forShare().first()).timeZone;
}

export async function updateLabSettings(actor: CurrentUser, values: LabSettings): Promise<LabSettings> {
  return db.transaction(async (trx) => {
    const row = await trx('lab_settings').where({ key: KEY }).forUpdate().first();
    const before = stored(row);
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
