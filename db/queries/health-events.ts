import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { getLabSettings } from '@/db/queries/settings';
import type { Row } from '@/db/row';
import { forbidden, notFound } from '@/lib/api/errors';
import { HEALTH_EVENT_WRITER_ROLES, isStaff } from '@/lib/auth/roles';
import type { CurrentUser } from '@/lib/auth/session';
import { HEALTH_EVENT_KIND_LABELS, type HealthEventKind } from '@/lib/health/kinds';
import type { CollectionFlag, HistoryEvent } from '@/lib/history/series';
import type { ReportHealthEvent } from '@/lib/reports/snapshot';
import type { LabSettings } from '@/lib/settings/lab-settings';
import type { HealthEventValues } from '@/lib/validations/health-event';
import { healthEventsCoveringCollection as eventsCoveringCollection } from './report-core';
import { eventWindows, flagCollections, reEvaluateFrom, spermatogenicWindow, type LabDate } from '@/lib/windows/window';

/*
 * Health events of stallions and the spermatogenic windows they open. Staff read them; technicians
 * and veterinarians record, change and delete them, each write audited with before and after.
 * Clients never reach these (a signed report carries the events that covered its collection,
 * frozen in its snapshot).
 */

export interface HealthEvent {
  id: number;
  stallionId: number;
  kind: HealthEventKind;
  kindLabel: string;
  startedOn: LabDate;
  endedOn: LabDate | null;
  peakTemperatureC: number | null;
  notes: string | null;
  recordedBy: string;
  updatedBy: string | null;
  createdAt: string;
  updatedAt: string;
  /** The event's window on the lab's calendar, with the lab's current window settings. */
  window: { startDate: LabDate; endDate: LabDate; lastDate: LabDate; clearsDate: LabDate; totalDays: number };
}

const windowSettings = (s: LabSettings) => ({ spermatogenesisDays: s.spermatogenesisDays, epididymalTransitDays: s.epididymalTransitDays, timeZone: s.timeZone });

function toHealthEvent(r: Row, settings: LabSettings): HealthEvent {
  const w = spermatogenicWindow(r.started_on, windowSettings(settings), r.ended_on);
  return {
    id: r.id,
    stallionId: r.stallion_id,
    kind: r.kind,
    kindLabel: HEALTH_EVENT_KIND_LABELS[r.kind as HealthEventKind],
    startedOn: r.started_on,
    endedOn: r.ended_on ?? null,
    peakTemperatureC: r.peak_temperature_c == null ? null : Number(r.peak_temperature_c),
    notes: r.notes,
    recordedBy: r.recorded_by_name,
    updatedBy: r.updated_by_name ?? null,
    createdAt: new Date(r.created_at).toISOString(),
    updatedAt: new Date(r.updated_at).toISOString(),
    window: { startDate: w.startDate, endDate: w.endDate, lastDate: w.lastDate, clearsDate: w.clearsDate, totalDays: w.totalDays },
  };
}

function selectEvents(k: Knex | Knex.Transaction = db) {
  return k('health_events as e')
    .join('users as u', 'u.id', 'e.recorded_by')
    .leftJoin('users as v', 'v.id', 'e.updated_by')
    .select('e.*', 'u.name as recorded_by_name', 'v.name as updated_by_name');
}

function requireStaff(actor: CurrentUser) {
  if (!isStaff(actor.role)) throw forbidden('Health events are kept for the lab staff.');
}
function requireWriter(actor: CurrentUser) {
  if (!HEALTH_EVENT_WRITER_ROLES.includes(actor.role)) throw forbidden('Only technicians and veterinarians record health events.');
}

const toRow = (v: HealthEventValues) => ({
  kind: v.kind,
  started_on: v.startedOn,
  ended_on: v.endedOn ?? null,
  peak_temperature_c: v.peakTemperatureC ?? null,
  notes: v.notes ?? null,
});

/** What the audit log keeps of a row: its recorded values. */
const auditOf = (r: Row) => ({
  stallion_id: r.stallion_id, kind: r.kind, started_on: r.started_on, ended_on: r.ended_on ?? null,
  peak_temperature_c: r.peak_temperature_c == null ? null : Number(r.peak_temperature_c), notes: r.notes ?? null,
});

/** A stallion's events, newest first. */
export async function listHealthEvents(actor: CurrentUser, stallionId: number): Promise<HealthEvent[]> {
  requireStaff(actor);
  const [stallion, settings] = await Promise.all([db('stallions').where({ id: stallionId }).first('id'), getLabSettings()]);
  if (!stallion) throw notFound('The stallion');
  const rows: Row[] = await selectEvents().where('e.stallion_id', stallionId).orderBy('e.started_on', 'desc').orderBy('e.id', 'desc');
  return rows.map((r) => toHealthEvent(r, settings));
}

export async function getHealthEvent(actor: CurrentUser, id: number): Promise<HealthEvent> {
  requireStaff(actor);
  const [r, settings] = await Promise.all([selectEvents().where('e.id', id).first(), getLabSettings()]);
  if (!r) throw notFound('The health event');
  return toHealthEvent(r, settings);
}

export async function createHealthEvent(actor: CurrentUser, stallionId: number, v: HealthEventValues): Promise<HealthEvent> {
  requireWriter(actor);
  const id = await db.transaction(async (trx) => {
    if (!(await trx('stallions').where({ id: stallionId }).first('id'))) throw notFound('The stallion');
    const row = { stallion_id: stallionId, ...toRow(v), recorded_by: actor.id };
    const [id] = await trx('health_events').insert(row);
    await writeAudit(trx, { userId: actor.id, action: 'create', entity: 'health_event', entityId: id, after: auditOf(row) });
    return id;
  });
  return getHealthEvent(actor, id);
}

export async function updateHealthEvent(actor: CurrentUser, id: number, v: HealthEventValues): Promise<HealthEvent> {
  requireWriter(actor);
  await db.transaction(async (trx) => {
    const before = await trx('health_events').where({ id }).forUpdate().first();
    if (!before) throw notFound('The health event');
    const row = toRow(v);
    await trx('health_events').where({ id }).update({ ...row, updated_by: actor.id, updated_at: trx.fn.now(3) });
    await writeAudit(trx, { userId: actor.id, action: 'update', entity: 'health_event', entityId: id, before: auditOf(before), after: auditOf({ ...before, ...row }) });
  });
  return getHealthEvent(actor, id);
}

export async function deleteHealthEvent(actor: CurrentUser, id: number): Promise<{ id: number; deleted: true }> {
  requireWriter(actor);
  await db.transaction(async (trx) => {
    const before = await trx('health_events').where({ id }).forUpdate().first();
    if (!before) throw notFound('The health event');
    await trx('health_events').where({ id }).delete();
    await writeAudit(trx, { userId: actor.id, action: 'delete', entity: 'health_event', entityId: id, before: auditOf(before) });
  });
  return { id, deleted: true };
}

/** The events of some stallions in the shape the history points take (internal: callers check the actor). */
export async function eventsOfStallions(stallionIds: readonly number[]): Promise<HistoryEvent[]> {
  if (stallionIds.length === 0) return [];
  const rows: Row[] = await db('health_events')
    .whereIn('stallion_id', [...new Set(stallionIds)])
    .orderBy('started_on')
    .orderBy('id')
    .select('id', 'stallion_id', 'kind', 'started_on', 'ended_on');
  return rows.map((r) => ({ id: r.id, stallionId: r.stallion_id, kind: r.kind, startedOn: r.started_on, endedOn: r.ended_on ?? null }));
}

export type { CollectionFlag };

/** Flags for collections of any stallions (one query for their events). */
export async function windowFlagsFor(actor: CurrentUser, collections: readonly { id: number; stallionId: number; collectedAt: string }[]): Promise<Map<number, CollectionFlag>> {
  const out = new Map<number, CollectionFlag>(collections.map((c) => [c.id, null]));
  if (!isStaff(actor.role) || collections.length === 0) return out;
  const [events, settings] = await Promise.all([eventsOfStallions(collections.map((c) => c.stallionId)), getLabSettings()]);
  if (events.length === 0) return out;
  const ws = windowSettings(settings);
  const byId = new Map(events.map((e) => [e.id, e]));
  for (const sid of new Set(collections.map((c) => c.stallionId))) {
    const evs = events.filter((e) => e.stallionId === sid).map((e) => ({ id: String(e.id), startDate: e.startedOn, endDate: e.endedOn }));
    if (evs.length === 0) continue;
    const windows = new Map(eventWindows(evs, ws).map((w) => [w.eventId, w]));
    for (const f of flagCollections(evs, collections.filter((c) => c.stallionId === sid).map((c) => ({ id: String(c.id), collectedAt: c.collectedAt })), ws)) {
      if (!f.window) continue;
      out.set(Number(f.id), {
        clearsDate: f.window.clearsDate,
        events: f.window.events.map((w) => {
          const e = byId.get(Number(w.eventId))!;
          return { eventId: e.id, kind: e.kind, label: HEALTH_EVENT_KIND_LABELS[e.kind], windowDay: w.windowDay, windowDays: windows.get(w.eventId)!.totalDays, clearsDate: w.clearsDate };
        }),
      });
    }
  }
  return out;
}

/** While a window of the stallion's events is open today (the lab's today), the date to re-evaluate from. */
export async function stallionReEvaluateFrom(actor: CurrentUser, stallionId: number, at: Date = new Date()): Promise<LabDate | null> {
  requireStaff(actor);
  const [events, settings] = await Promise.all([eventsOfStallions([stallionId]), getLabSettings()]);
  return reEvaluateFrom(events.map((e) => ({ id: String(e.id), startDate: e.startedOn, endDate: e.endedOn })), windowSettings(settings), at);
}

/**
 * The health events whose window covers a collection, in the shape of a report snapshot's
 * `healthEvents`, with the lab's current window settings (db/queries/report-core.ts has the one
 * implementation, which the demo seed shares).
 */
export async function healthEventsCoveringCollection(actor: CurrentUser, collectionId: number): Promise<ReportHealthEvent[]> {
  requireStaff(actor);
  const c = await db('collections').where({ id: collectionId }).first('id', 'stallion_id', 'collected_at');
  if (!c) throw notFound('The collection');
  return eventsCoveringCollection(db, { stallionId: c.stallion_id, collectedAt: new Date(c.collected_at).toISOString() }, await getLabSettings());
}
