/**
 * A stallion's history as a series: one point per collection with its figures, the morphology of
 * the read its figures rest on, and the health events whose spermatogenic window covers it. The
 * history page, its charts, the season summary and the exports all read these points, so a figure
 * is worked out once. Pure: the caller brings the rows, each read's `Morphology` (from the one
 * morphology engine) and the events.
 */
import { HEALTH_EVENT_KIND_LABELS, type HealthEventKind } from '@/lib/health/kinds';
import type { Morphology } from '@/lib/morphology/engine';
import type { ReadKind, ReadStatus } from '@/lib/reads/kinds';
import { figuresBasis } from '@/lib/reads/policy';
import { semenTotals } from '@/lib/semen/arithmetic';
import { SemenInputError } from '@/lib/semen/errors';
import { labDate as toLabDate, eventWindows, flagCollections, mergeWindows, type LabDate, type WindowSettings } from '@/lib/windows/window';

/** The class whose share the charts show as "detached heads" (the default set's key; a set without it shows none). */
export const DETACHED_HEAD_CLASS = 'detached_head';

/** The defect groups the charts and exports show, as % of sperm cells (each cell once, by its main class). */
export const HISTORY_DEFECTS = ['head', 'midpiece', 'droplet', 'tail', 'detachedHead'] as const;
export type HistoryDefect = (typeof HISTORY_DEFECTS)[number];
export const HISTORY_DEFECT_LABELS: Record<HistoryDefect, string> = {
  head: 'Head',
  midpiece: 'Midpiece',
  droplet: 'Cytoplasmic droplets',
  tail: 'Tail',
  detachedHead: 'Detached heads',
};

export interface HistoryCollectionRow {
  id: number;
  stallionId: number;
  stallion: string;
  /** ISO instant (UTC). */
  collectedAt: string;
  numberThatDay: number;
  /** ISO instant of this stallion's previous collection (whatever the range), or null. */
  previousAt: string | null;
  volumeMl: number | null;
  concentrationMillionPerMl: number | null;
  totalMotilityPct: number | null;
  progressiveMotilityPct: number | null;
}

export interface HistoryRead {
  readId: number;
  kind: ReadKind;
  status: ReadStatus;
  morphology: Morphology;
}

export interface HistoryEvent {
  id: number;
  stallionId: number;
  kind: HealthEventKind;
  /** Lab dates. */
  startedOn: LabDate;
  endedOn: LabDate | null;
}

export interface PointWindow {
  eventId: number;
  kind: HealthEventKind;
  label: string;
  /** 1 on the event's start date. */
  windowDay: number;
  /** Days in that event's window. */
  windowDays: number;
  /** First date after that event's window. */
  clearsDate: LabDate;
}

/** A collection's flag: when the merged stretch of windows holding it clears, and each event covering it. Null outside every window. */
export type CollectionFlag = { clearsDate: LabDate; events: PointWindow[] } | null;

export interface HistoryPoint {
  id: number;
  stallionId: number;
  stallion: string;
  collectedAt: string;
  /** The collection's day on the lab's calendar. */
  labDate: LabDate;
  numberThatDay: number;
  /** Days (24 h) since the stallion's previous collection, unrounded; null for his first. */
  daysSincePrevious: number | null;
  volumeMl: number | null;
  concentrationMillionPerMl: number | null;
  totalMotilityPct: number | null;
  progressiveMotilityPct: number | null;
  /** 10^9; null while a semen value is missing. */
  totalSpermBillion: number | null;
  progressivelyMotileBillion: number | null;
  /** Progressively motile, morphologically normal sperm, 10^9; null without a submitted read. */
  pmmnBillion: number | null;
  /** % normal of the read the figures rest on; null where no read is submitted. */
  percentNormal: number | null;
  /** Wilson 95 % interval on % normal, in %. */
  normalInterval: { lower: number; upper: number } | null;
  cellsCounted: number | null;
  /** Which read: the settled read, or a first read not yet checked by a second reader. */
  read: { readId: number; kind: ReadKind; basis: 'settled' | 'first-unchecked' } | null;
  /** % of sperm cells by main class; null without a read (detached heads also when the set has no such class). */
  defects: Record<HistoryDefect, number | null>;
  /** Each event whose window covers the collection, by start date. */
  windows: PointWindow[];
  /** When the merged stretch of windows holding it clears; null outside every window. */
  windowClearsOn: LabDate | null;
}

const DAY_MS = 86_400_000;

function totalsOf(r: HistoryCollectionRow, normalPct: number | null) {
  const { volumeMl, concentrationMillionPerMl, totalMotilityPct, progressiveMotilityPct } = r;
  if (volumeMl == null || concentrationMillionPerMl == null) return null;
  try {
    // Motility may be missing while volume and concentration are known: total sperm still stands.
    if (totalMotilityPct == null || progressiveMotilityPct == null) {
      return { totalSpermBillion: semenTotals({ volumeMl, concentrationMillionPerMl, totalMotilityPct: 0, progressiveMotilityPct: 0 }).totalSpermBillion, progressivelyMotileBillion: null, pmmnBillion: null };
    }
    const t = semenTotals({ volumeMl, concentrationMillionPerMl, totalMotilityPct, progressiveMotilityPct, normalPct });
    return { totalSpermBillion: t.totalSpermBillion, progressivelyMotileBillion: t.progressivelyMotileBillion, pmmnBillion: t.pmmnBillion };
  } catch (err) {
    if (err instanceof SemenInputError) return null; // contradictory stored values: no figures rather than wrong ones
    throw err;
  }
}

function defectsOf(m: Morphology | null): Record<HistoryDefect, number | null> {
  const group = (g: 'head' | 'midpiece' | 'droplet' | 'tail') => m?.cells.groups.find((x) => x.group === g)?.pct ?? null;
  const detached = m?.cells.perClass.find((c) => c.classId === DETACHED_HEAD_CLASS);
  return { head: group('head'), midpiece: group('midpiece'), droplet: group('droplet'), tail: group('tail'), detachedHead: detached?.pctOfCells ?? null };
}

/**
 * The points of some collections (any stallions), in the order given. `reads` holds each
 * collection's reads the actor may see; `events` the health events of their stallions (all of
 * them: a window opened before the range still covers collections inside it).
 */
export function historyPoints(
  rows: readonly HistoryCollectionRow[],
  reads: ReadonlyMap<number, readonly HistoryRead[]>,
  events: readonly HistoryEvent[],
  settings: WindowSettings,
): HistoryPoint[] {
  const byStallion = new Map<number, HistoryEvent[]>();
  for (const e of events) {
    const list = byStallion.get(e.stallionId);
    if (list) list.push(e);
    else byStallion.set(e.stallionId, [e]);
  }
  const flags = new Map<number, ReturnType<typeof flagCollections>[number]['window']>();
  const stallionIds = new Set(rows.map((r) => r.stallionId));
  for (const sid of stallionIds) {
    const evs = (byStallion.get(sid) ?? []).map((e) => ({ id: String(e.id), startDate: e.startedOn, endDate: e.endedOn }));
    const mine = rows.filter((r) => r.stallionId === sid).map((r) => ({ id: String(r.id), collectedAt: r.collectedAt }));
    for (const f of flagCollections(evs, mine, settings)) flags.set(Number(f.id), f.window);
  }
  const eventById = new Map(events.map((e) => [e.id, e]));
  const tz = settings.timeZone ?? 'UTC';

  return rows.map((r) => {
    const basis = figuresBasis(reads.get(r.id) ?? []);
    const m = basis?.read.morphology ?? null;
    const pctNormal = m?.pctNormal ?? null;
    const flag = flags.get(r.id) ?? null;
    const at = Date.parse(r.collectedAt);
    return {
      id: r.id,
      stallionId: r.stallionId,
      stallion: r.stallion,
      collectedAt: r.collectedAt,
      labDate: toLabDate(r.collectedAt, tz),
      numberThatDay: r.numberThatDay,
      daysSincePrevious: r.previousAt ? (at - Date.parse(r.previousAt)) / DAY_MS : null,
      volumeMl: r.volumeMl,
      concentrationMillionPerMl: r.concentrationMillionPerMl,
      totalMotilityPct: r.totalMotilityPct,
      progressiveMotilityPct: r.progressiveMotilityPct,
      totalSpermBillion: null,
      progressivelyMotileBillion: null,
      pmmnBillion: null,
      ...totalsOf(r, pctNormal),
      percentNormal: pctNormal,
      normalInterval: m?.normalIntervalPct ?? null,
      cellsCounted: m ? m.cellsCounted : null,
      read: basis ? { readId: basis.read.readId, kind: basis.read.kind, basis: basis.basis } : null,
      defects: defectsOf(m),
      windows: (flag?.events ?? []).map((w) => {
        const e = eventById.get(Number(w.eventId))!;
        return {
          eventId: e.id,
          kind: e.kind,
          label: HEALTH_EVENT_KIND_LABELS[e.kind],
          windowDay: w.windowDay,
          windowDays: dayCount(w.startDate, w.clearsDate),
          clearsDate: w.clearsDate,
        };
      }),
      windowClearsOn: flag?.clearsDate ?? null,
    };
  });
}

const dayCount = (from: LabDate, to: LabDate) => (Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / DAY_MS;

/** Each event with its window, and the windows merged into stretches (for shading charts). */
export function historyWindows(events: readonly HistoryEvent[], settings: WindowSettings) {
  const windows = eventWindows(events.map((e) => ({ id: String(e.id), startDate: e.startedOn, endDate: e.endedOn })), settings);
  return {
    perEvent: new Map(windows.map((w) => [Number(w.eventId), { startDate: w.startDate, endDate: w.endDate, lastDate: w.lastDate, clearsDate: w.clearsDate, totalDays: w.totalDays }])),
    merged: mergeWindows(windows).map((m) => ({ startDate: m.startDate, clearsDate: m.clearsDate, eventIds: m.eventIds.map(Number) })),
  };
}
