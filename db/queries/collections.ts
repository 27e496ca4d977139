import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/db/knex';
import { whereContains } from '@/db/queries/search';
import { writeAudit } from '@/db/queries/audit';
import { morphologyByCollection, type ReadMorphology } from '@/db/queries/morphology';
import { recountAdvisedAmong } from '@/db/queries/agreement';
import { windowFlagsFor, type CollectionFlag } from '@/db/queries/health-events';
import type { Row } from '@/db/row';
import { ApiError, notFound } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import { getLabSettings, labTimeZoneFor } from '@/db/queries/settings';
import { concentrationFromChamber } from '@/lib/semen/chamber';
import { labDay, wallTimeToDate } from '@/lib/time/lab-time';
import type { CollectionValues } from '@/lib/validations/collection';
import type { Page } from '@/lib/validations/fields';
import { FIRST_READ, type ReadStatus } from '@/lib/reads/kinds';

export type Collection = {
  id: number;
  stallionId: number;
  stallion: string;
  collectedAt: string;
  numberThatDay: number;
  volumeMl: number | null;
  concentrationMillionPerMl: number | null;
  concentrationMethod: 'entered' | 'chamber';
  chamberDilution: number | null;
  chamberSquares: number | null;
  chamberCount1: number | null;
  chamberCount2: number | null;
  totalMotilityPct: number | null;
  progressiveMotilityPct: number | null;
  preparation: CollectionValues['preparation'];
  optics: CollectionValues['optics'];
  magnification: number;
  collectedBy: string | null;
  recordedBy: string;
  remarks: string | null;
  /** Days since this stallion's previous collection (fractional), null for his first. */
  daysSincePrevious: number | null;
  /** Sperm cells counted in the first read and % normal among them (null before the read starts); from the morphology engine. */
  firstRead: { cells: number; pctNormal: number | null; status: ReadStatus } | null;
  /** The first and second reads' % normal differ beyond the acceptable difference, and nothing is settled yet (lib/reads/policy.ts recountAdvised). */
  recountAdvised: boolean;
  /** Inside a health event's spermatogenic window: each event covering it with its day, and when the merged stretch clears. */
  window: CollectionFlag;
};

const DAY_MS = 864e5;

function toCollection(r: Row, reads: readonly ReadMorphology[], window: CollectionFlag, recount: boolean): Collection {
  // The reads come visible to the actor and in read order: the latest first read they may see.
  const first = reads.findLast((x) => x.kind === FIRST_READ);
  const at = new Date(r.collected_at);
  const prev = r.previous_at ? new Date(r.previous_at) : null;
  return {
    id: r.id,
    stallionId: r.stallion_id,
    stallion: r.stallion,
    collectedAt: at.toISOString(),
    numberThatDay: r.number_that_day,
    volumeMl: r.volume_ml,
    concentrationMillionPerMl: r.concentration_m_per_ml,
    concentrationMethod: r.concentration_method,
    chamberDilution: r.chamber_dilution,
    chamberSquares: r.chamber_squares,
    chamberCount1: r.chamber_count_1,
    chamberCount2: r.chamber_count_2,
    totalMotilityPct: r.total_motility_pct,
    progressiveMotilityPct: r.progressive_motility_pct,
    preparation: r.preparation,
    optics: r.optics,
    magnification: r.magnification,
    collectedBy: r.collected_by,
    recordedBy: r.recorded_by_name,
    remarks: r.remarks,
    daysSincePrevious: prev ? Math.round(((at.getTime() - prev.getTime()) / DAY_MS) * 10) / 10 : null,
    firstRead: first ? { cells: first.morphology.cellsCounted, pctNormal: first.morphology.pctNormal, status: first.status } : null,
    recountAdvised: recount,
    window,
  };
}

function selectCollections(k: Knex | Knex.Transaction = db) {
  return k('collections as k')
    .join('stallions as s', 's.id', 'k.stallion_id')
    .join('users as u', 'u.id', 'k.recorded_by')
    .select(
      'k.*',
      's.name as stallion',
      'u.name as recorded_by_name',
      // Backed by the (stallion_id, collected_at) index.
      k.raw('(select max(p.collected_at) from collections p where p.stallion_id = k.stallion_id and p.collected_at < k.collected_at) as previous_at'),
    );
}

/**
 * Rows to collections, with their reads' figures from the morphology engine (one grouped query for
 * the lot) and their health-event window flags (one query for their stallions' events).
 */
async function withMorphology(actor: CurrentUser, rows: Row[]): Promise<Collection[]> {
  const [reads, flags] = await Promise.all([
    morphologyByCollection(actor, rows.map((r) => r.id)),
    windowFlagsFor(actor, rows.map((r) => ({ id: r.id, stallionId: r.stallion_id, collectedAt: new Date(r.collected_at).toISOString() }))),
  ]);
  const recount = await recountAdvisedAmong(actor, reads);
  return rows.map((r) => toCollection(r, reads.get(r.id) ?? [], flags.get(r.id) ?? null, recount.has(r.id)));
}

const SORT_COLUMNS = {
  collectedAt: 'k.collected_at',
  stallion: 's.name',
  volumeMl: 'k.volume_ml',
  concentration: 'k.concentration_m_per_ml',
  progressiveMotilityPct: 'k.progressive_motility_pct',
  totalSperm: db.raw('k.volume_ml * k.concentration_m_per_ml'),
} as const;

export async function listCollections(actor: CurrentUser, q: {
  page: number; pageSize: number; sort: keyof typeof SORT_COLUMNS; dir: 'asc' | 'desc'; q?: string; stallionId?: number; from?: string; to?: string;
}): Promise<Page<Collection>> {
  const timeZone = q.from || q.to ? (await getLabSettings()).timeZone : 'UTC';
  // From and to are the lab's calendar days (noon is on that day whatever the clock changes).
  const dayOf = (date: string) => labDay(wallTimeToDate(`${date}T12:00`, timeZone) ?? new Date(`${date}T12:00:00Z`), timeZone);
  const filter = (b: Knex.QueryBuilder) => {
    if (q.stallionId) b.where('k.stallion_id', q.stallionId);
    if (q.from) b.where('k.collected_at', '>=', dayOf(q.from).start);
    if (q.to) b.where('k.collected_at', '<', dayOf(q.to).end);
    if (q.q) whereContains(b, ['s.name', 'k.remarks', 'k.collected_by'], q.q);
    return b;
  };
  const [{ n }] = await filter(db('collections as k').join('stallions as s', 's.id', 'k.stallion_id')).count({ n: '*' });
  const sort = SORT_COLUMNS[q.sort];
  const rows = await filter(selectCollections())
    .orderBy(typeof sort === 'string' ? sort : (sort as never), q.dir)
    .orderBy('k.id', q.dir)
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize);
  return { rows: await withMorphology(actor, rows), total: Number(n), page: q.page, pageSize: q.pageSize };
}

export async function getCollection(actor: CurrentUser, id: number): Promise<Collection> {
  const r = await selectCollections().where('k.id', id).first();
  if (!r) throw notFound('The collection');
  return (await withMorphology(actor, [r]))[0]!;
}

/** Collections of the same stallion within a few hours, for pairing first and second ejaculates. */
export async function collectionsAround(stallionId: number, at: Date, hours = 6): Promise<{ id: number; collectedAt: string }[]> {
  const rows = await db('collections')
    .where('stallion_id', stallionId)
    .whereBetween('collected_at', [new Date(at.getTime() - hours * 36e5), new Date(at.getTime() + hours * 36e5)])
    .orderBy('collected_at')
    .select('id', 'collected_at');
  return rows.map((r) => ({ id: r.id, collectedAt: new Date(r.collected_at).toISOString() }));
}

function toRow(v: CollectionValues) {
  let concentration = v.concentrationMillionPerMl ?? null;
  if (v.concentrationMethod === 'chamber') {
    concentration = concentrationFromChamber({ dilution: v.chamberDilution!, squaresCounted: v.chamberSquares!, counts: [v.chamberCount1!, v.chamberCount2!] }).concentrationMillionPerMl;
    concentration = Math.round(concentration * 100) / 100;
  }
  const chamber = v.concentrationMethod === 'chamber';
  return {
    stallion_id: v.stallionId,
    collected_at: v.collectedAt,
    volume_ml: v.volumeMl,
    concentration_m_per_ml: concentration,
    concentration_method: v.concentrationMethod,
    chamber_dilution: chamber ? v.chamberDilution : null,
    chamber_squares: chamber ? v.chamberSquares : null,
    chamber_count_1: chamber ? v.chamberCount1 : null,
    chamber_count_2: chamber ? v.chamberCount2 : null,
    total_motility_pct: v.totalMotilityPct,
    progressive_motility_pct: v.progressiveMotilityPct,
    preparation: v.preparation,
    optics: v.optics,
    magnification: v.magnification,
    collected_by: v.collectedBy ?? null,
    remarks: v.remarks ?? null,
  };
}

/** Renumbers a stallion's collections on one of the lab's days (1st, 2nd … ejaculate of that day). */
async function renumberDay(trx: Knex.Transaction, stallionId: number, at: Date, timeZone: string) {
  const { start, end } = labDay(at, timeZone);
  const ids: number[] = await trx('collections')
    .where('stallion_id', stallionId)
    .where('collected_at', '>=', start)
    .where('collected_at', '<', end)
    .orderBy('collected_at')
    .orderBy('id')
    .pluck('id');
  for (const [i, id] of ids.entries()) await trx('collections').where({ id }).update({ number_that_day: i + 1 });
}

async function requireStallion(trx: Knex.Transaction, stallionId: number) {
  if (!(await trx('stallions').where({ id: stallionId }).first())) {
    throw new ApiError(422, 'invalid_input', 'The stallion was not found.', [{ path: 'stallionId', message: 'Choose an existing stallion.' }]);
  }
}

export async function createCollection(actor: CurrentUser, v: CollectionValues): Promise<Collection> {
  const id = await db.transaction(async (trx) => {
    // The zone first: a zone change takes the same lock before it touches any collection.
    const timeZone = await labTimeZoneFor(trx);
    await requireStallion(trx, v.stallionId);
    const row = { ...toRow(v), recorded_by: actor.id };
    const [id] = await trx('collections').insert(row);
    await renumberDay(trx, v.stallionId, v.collectedAt, timeZone);
    await writeAudit(trx, { userId: actor.id, action: 'create', entity: 'collection', entityId: id, after: row });
    return id;
  });
  return getCollection(actor, id);
}

export async function updateCollection(actor: CurrentUser, id: number, v: CollectionValues): Promise<Collection> {
  await db.transaction(async (trx) => {
    const timeZone = await labTimeZoneFor(trx); // before the row lock, as in createCollection
    const before = await trx('collections').where({ id }).forUpdate().first();
    if (!before) throw notFound('The collection');
    await requireStallion(trx, v.stallionId);
    const row = toRow(v);
    await trx('collections').where({ id }).update({ ...row, updated_at: trx.fn.now(3) });
    await renumberDay(trx, before.stallion_id, new Date(before.collected_at), timeZone);
    await renumberDay(trx, v.stallionId, v.collectedAt, timeZone);
    const { created_at, updated_at, id: _id, ...beforeRow } = before;
    await writeAudit(trx, { userId: actor.id, action: 'update', entity: 'collection', entityId: id, before: beforeRow, after: row });
  });
  return getCollection(actor, id);
}

/** A stallion's collections in time order with total sperm (10^9), for output estimates and charts. */
export async function collectionTimeline(stallionId: number): Promise<{ id: number; collectedAt: Date; totalSpermBillion: number | null }[]> {
  const rows = await db('collections').where({ stallion_id: stallionId }).orderBy('collected_at').select('id', 'collected_at', 'volume_ml', 'concentration_m_per_ml');
  return rows.map((r) => ({
    id: r.id,
    collectedAt: new Date(r.collected_at),
    totalSpermBillion: r.volume_ml != null && r.concentration_m_per_ml != null ? (r.volume_ml * r.concentration_m_per_ml) / 1000 : null,
  }));
}
