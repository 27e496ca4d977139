import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/db/knex';
import { eventsOfStallions, listHealthEvents, type HealthEvent } from '@/db/queries/health-events';
import { morphologyByCollection } from '@/db/queries/morphology';
import { getLabSettings } from '@/db/queries/settings';
import { getStallion } from '@/db/queries/stallions';
import type { Row } from '@/db/row';
import { forbidden } from '@/lib/api/errors';
import { isStaff } from '@/lib/auth/roles';
import type { CurrentUser } from '@/lib/auth/session';
import { seasonRange, type DateRange } from '@/lib/history/range';
import { historyPoints, historyWindows, type HistoryCollectionRow, type HistoryPoint } from '@/lib/history/series';
import { seasonSummary, type SeasonSummary } from '@/lib/history/summary';
import type { LabSettings } from '@/lib/settings/lab-settings';
import { labDateEnd, labDateStart, labDayKey } from '@/lib/time/lab-time';
import { reEvaluateFrom, type LabDate } from '@/lib/windows/window';

/*
 * A stallion's history (the history page, its API and the exports): his collections in a range of
 * the lab's days with their figures, through the one morphology engine. The cost is a fixed handful
 * of queries whatever the number of collections: the collections, their reads and the grouped mark
 * counts (db/queries/morphology.ts), the health events and the settings. Exports walk the same
 * rows in chunks so a long range never sits in memory.
 */

export interface HistoryScope {
  /** One stallion, or every stallion (the lab's exports). */
  stallionId?: number;
  /** Lab dates, both inclusive; open when omitted. */
  from?: LabDate;
  to?: LabDate;
}

const windowSettings = (s: LabSettings) => ({ spermatogenesisDays: s.spermatogenesisDays, epididymalTransitDays: s.epididymalTransitDays, timeZone: s.timeZone });

function collectionsInScope(scope: HistoryScope, timeZone: string): Knex.QueryBuilder {
  const q = db('collections as k').join('stallions as s', 's.id', 'k.stallion_id');
  if (scope.stallionId !== undefined) q.where('k.stallion_id', scope.stallionId);
  if (scope.from) q.where('k.collected_at', '>=', labDateStart(scope.from, timeZone));
  if (scope.to) q.where('k.collected_at', '<', labDateEnd(scope.to, timeZone));
  return q.select(
    'k.id', 'k.stallion_id', 's.name as stallion', 'k.collected_at', 'k.number_that_day', 'k.volume_ml', 'k.concentration_m_per_ml',
    'k.total_motility_pct', 'k.progressive_motility_pct',
    // The previous collection of the same stallion, in the range or not (the (stallion_id, collected_at) index).
    db.raw('(select max(p.collected_at) from collections p where p.stallion_id = k.stallion_id and p.collected_at < k.collected_at) as previous_at'),
  );
}

const num = (v: unknown) => (v == null ? null : Number(v));
const toRow = (r: Row): HistoryCollectionRow => ({
  id: r.id,
  stallionId: r.stallion_id,
  stallion: r.stallion,
  collectedAt: new Date(r.collected_at).toISOString(),
  numberThatDay: r.number_that_day,
  previousAt: r.previous_at ? new Date(r.previous_at).toISOString() : null,
  volumeMl: num(r.volume_ml),
  concentrationMillionPerMl: num(r.concentration_m_per_ml),
  totalMotilityPct: num(r.total_motility_pct),
  progressiveMotilityPct: num(r.progressive_motility_pct),
});

/** Points of these rows: their reads' morphology (two queries for all) and their stallions' events (one). */
async function pointsOf(actor: CurrentUser, rows: Row[], settings: LabSettings): Promise<HistoryPoint[]> {
  if (rows.length === 0) return [];
  const typed = rows.map(toRow);
  const [reads, events] = await Promise.all([morphologyByCollection(actor, typed.map((r) => r.id)), eventsOfStallions(typed.map((r) => r.stallionId))]);
  return historyPoints(typed, reads, events, windowSettings(settings));
}

/** The points of a scope in time order, all at once (a stallion's season is a few hundred at most). */
export async function historyPointsIn(actor: CurrentUser, scope: HistoryScope, settings?: LabSettings): Promise<HistoryPoint[]> {
  if (!isStaff(actor.role)) throw forbidden();
  const s = settings ?? (await getLabSettings());
  const rows: Row[] = await collectionsInScope(scope, s.timeZone).orderBy('k.collected_at').orderBy('k.id');
  return pointsOf(actor, rows, s);
}

/**
 * The points of a scope in time order, `chunk` collections at a time (keyset paging on
 * collected_at, id), for streamed exports: memory stays at one chunk whatever the range.
 */
export async function* historyPointChunks(actor: CurrentUser, scope: HistoryScope, chunk = 250): AsyncGenerator<HistoryPoint[]> {
  if (!isStaff(actor.role)) throw forbidden();
  const settings = await getLabSettings();
  let after: { at: Date; id: number } | null = null;
  for (;;) {
    const q = collectionsInScope(scope, settings.timeZone);
    if (after) {
      const { at, id } = after;
      q.where((b) => b.where('k.collected_at', '>', at).orWhere((b2) => b2.where('k.collected_at', at).andWhere('k.id', '>', id)));
    }
    const rows: Row[] = await q.orderBy('k.collected_at').orderBy('k.id').limit(chunk);
    if (rows.length === 0) return;
    yield await pointsOf(actor, rows, settings);
    if (rows.length < chunk) return;
    const last = rows[rows.length - 1]!;
    after = { at: new Date(last.collected_at), id: last.id };
  }
}

export interface StallionHistory {
  stallion: { id: number; name: string };
  range: DateRange;
  timeZone: string;
  window: { spermatogenesisDays: number; epididymalTransitDays: number };
  /** Lab years with collections of this stallion, newest first (the range picker's seasons). */
  seasons: number[];
  series: HistoryPoint[];
  /** Every health event of the stallion (a window opened before the range still reaches into it). */
  events: HealthEvent[];
  /** The events' windows merged where they overlap or touch, for shading. */
  windows: { startDate: LabDate; clearsDate: LabDate; eventIds: number[] }[];
  /** While a window is open today: the date to re-evaluate from. */
  reEvaluateFrom: LabDate | null;
  summary: SeasonSummary;
}

/** Lab years holding this stallion's collections, newest first. */
async function seasonsOf(stallionId: number, timeZone: string): Promise<number[]> {
  const r = await db('collections').where({ stallion_id: stallionId }).first(db.raw('min(collected_at) as first_at'), db.raw('max(collected_at) as last_at'));
  if (!r?.first_at) return [];
  const first = Number(labDayKey(new Date(r.first_at), timeZone).slice(0, 4));
  const last = Number(labDayKey(new Date(r.last_at), timeZone).slice(0, 4));
  return Array.from({ length: last - first + 1 }, (_, i) => last - i);
}

/**
 * The range asked for, with defaults: neither end given → the season (lab year) of the stallion's
 * latest collection, or this year; one end given → to the end of that year / from its start.
 */
function resolveRange(q: { from?: LabDate; to?: LabDate }, seasons: number[], timeZone: string): DateRange {
  if (q.from && q.to) return { from: q.from, to: q.to };
  if (q.from) return { from: q.from, to: seasonRange(Number(q.from.slice(0, 4))).to };
  if (q.to) return { from: seasonRange(Number(q.to.slice(0, 4))).from, to: q.to };
  return seasonRange(seasons[0] ?? Number(labDayKey(new Date(), timeZone).slice(0, 4)));
}

/** GET /api/stallions/:id/history and the history page. */
export async function stallionHistory(actor: CurrentUser, stallionId: number, q: { from?: LabDate; to?: LabDate } = {}, now: Date = new Date()): Promise<StallionHistory> {
  if (!isStaff(actor.role)) throw forbidden();
  const [stallion, settings] = await Promise.all([getStallion(actor, stallionId), getLabSettings()]);
  const seasons = await seasonsOf(stallion.id, settings.timeZone);
  const range = resolveRange(q, seasons, settings.timeZone);
  const [series, events] = await Promise.all([historyPointsIn(actor, { stallionId: stallion.id, ...range }, settings), listHealthEvents(actor, stallion.id)]);
  const ws = windowSettings(settings);
  const windowEvents = events.map((e) => ({ id: e.id, stallionId: e.stallionId, kind: e.kind, startedOn: e.startedOn, endedOn: e.endedOn }));
  return {
    stallion: { id: stallion.id, name: stallion.name },
    range,
    timeZone: settings.timeZone,
    window: { spermatogenesisDays: settings.spermatogenesisDays, epididymalTransitDays: settings.epididymalTransitDays },
    seasons,
    series,
    events: [...events].reverse(), // by start date, oldest first, as the charts draw them
    windows: historyWindows(windowEvents, ws).merged,
    reEvaluateFrom: reEvaluateFrom(windowEvents.map((e) => ({ id: String(e.id), startDate: e.startedOn, endDate: e.endedOn })), ws, now),
    summary: seasonSummary(series),
  };
}
