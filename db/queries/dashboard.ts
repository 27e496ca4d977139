import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/db/knex';
import { collectionReport } from '@/db/queries/report-core';
import { getLabSettings } from '@/db/queries/settings';
import type { Row } from '@/db/row';
import type { CurrentUser } from '@/lib/auth/session';
import { READER_ROLES, ROLES, type Role } from '@/lib/auth/roles';
import { recountAdvisedAmong } from '@/db/queries/agreement';
import { FIRST_READ, OPEN, SECOND_READ, SETTLED_READ, SUBMITTED, type ReadKind } from '@/lib/reads/kinds';
import { visibleReadsOfCollections } from '@/lib/reads/policy';
import { labYear } from '@/lib/time/lab-time';

/*
 * The dashboard's figures and work lists. "This season" is the lab's calendar year of the newest
 * collection on record, not the last 30 days from today: a lab looking back at a season months
 * later still sees what it did, with the dates it covers.
 */

export type SeasonOverview = {
  year: number;
  /** First and last collection of the season (ISO instants). */
  from: string;
  to: string;
  collections: number;
  stallionsCollected: number;
  /** Collections of the season whose first read is submitted. */
  firstReadsSubmitted: number;
};

/** The season of the newest collection, or null when nothing is recorded yet. */
export async function seasonOverview(timeZone: string): Promise<SeasonOverview | null> {
  const latest = await db('collections').max({ at: 'collected_at' }).first();
  if (!latest?.at) return null;
  const { year, start, end } = labYear(new Date(latest.at), timeZone);
  const inSeason = () => db('collections as k').where('k.collected_at', '>=', start).where('k.collected_at', '<', end);
  const [totals, read] = await Promise.all([
    inSeason().first(db.raw('count(*) as n'), db.raw('count(distinct k.stallion_id) as stallions'), db.raw('min(k.collected_at) as first_at'), db.raw('max(k.collected_at) as last_at')),
    inSeason().join('reads as r', 'r.collection_id', 'k.id').where({ 'r.kind': FIRST_READ, 'r.status': SUBMITTED }).count({ n: '*' }).first(),
  ]);
  return {
    year,
    from: new Date(totals.first_at).toISOString(),
    to: new Date(totals.last_at).toISOString(),
    collections: Number(totals.n),
    stallionsCollected: Number(totals.stallions),
    firstReadsSubmitted: Number(read?.n ?? 0),
  };
}

export async function fileCounts(): Promise<{ stallions: number; clients: number }> {
  const [stallions, clients] = await Promise.all([db('stallions').count({ n: '*' }).first(), db('clients').count({ n: '*' }).first()]);
  return { stallions: Number(stallions?.n ?? 0), clients: Number(clients?.n ?? 0) };
}

export type AwaitingRead = { id: number; collectedAt: string; stallion: string; images: number };

/** Collections with field images and no first read yet: the technicians' first work list. */
export async function collectionsAwaitingFirstRead(limit = 10): Promise<AwaitingRead[]> {
  const rows: Row[] = await db('collections as k')
    .join('stallions as s', 's.id', 'k.stallion_id')
    .join('field_images as i', 'i.collection_id', 'k.id')
    .leftJoin('reads as r', function () {
      this.on('r.collection_id', 'k.id').andOnVal('r.kind', FIRST_READ);
    })
    .whereNull('r.id')
    .groupBy('k.id', 'k.collected_at', 's.name')
    .orderBy('k.collected_at', 'desc')
    .limit(limit)
    .select('k.id', 'k.collected_at', 's.name as stallion')
    .count({ images: 'i.id' });
  return rows.map((r) => ({ id: r.id, collectedAt: new Date(r.collected_at).toISOString(), stallion: r.stallion, images: Number(r.images) }));
}

export type ReadInProgress = { readId: number; kind: ReadKind; collectionId: number; collectedAt: string; stallion: string; readerId: number; readerName: string; mine: boolean; marks: number };

/** Open reads the user may see (lib/reads/policy.ts visibleReads: an open second read only to its reader), their own first. */
export async function readsInProgress(user: CurrentUser, limit = 10): Promise<ReadInProgress[]> {
  const rows: Row[] = await db('reads as r')
    .join('collections as k', 'k.id', 'r.collection_id')
    .join('stallions as s', 's.id', 'k.stallion_id')
    .join('users as u', 'u.id', 'r.reader_id')
    .where('r.status', OPEN)
    .orderByRaw('r.reader_id = ? desc', [user.id])
    .orderBy('r.started_at', 'desc')
    .limit(limit * 3)
    .select('r.id', 'r.kind', 'r.status', 'r.reader_id', 'k.id as collection_id', 'k.collected_at', 's.name as stallion', 'u.name as reader_name')
    .select(db('marks as m').whereRaw('m.read_id = r.id').where('m.deleted', false).count('*').as('marks'));
  // The rule needs every read of those collections (an open second read of the user's blinds the rest).
  const siblings: Row[] = rows.length
    ? await db('reads').whereIn('collection_id', [...new Set(rows.map((r) => r.collection_id))]).select('id', 'collection_id', 'kind', 'status', 'reader_id')
    : [];
  const visible = new Set(
    visibleReadsOfCollections(user, siblings.map((r) => ({ id: r.id as number, collectionId: r.collection_id as number, kind: r.kind as ReadKind, status: r.status, readerId: r.reader_id as number }))).map((r) => r.id),
  );
  return rows
    .filter((r) => visible.has(r.id))
    .slice(0, limit)
    .map((r) => ({
      readId: r.id,
      kind: r.kind,
      collectionId: r.collection_id,
      collectedAt: new Date(r.collected_at).toISOString(),
      stallion: r.stallion,
      readerId: r.reader_id,
      readerName: r.reader_name,
      mine: r.reader_id === user.id,
      marks: Number(r.marks),
    }));
}

export type AwaitingSecondRead = { id: number; collectedAt: string; stallion: string; firstReader: string; recount: boolean };

/**
 * The second reader's work list: collections whose first read is submitted and that wait for a
 * second read the user may start (never their own first reads), newest first. Where the lab setting
 * "second read required" is off nothing waits for a plain second read, so only recounts are listed
 * (first and second reads whose % normal differ beyond the acceptable difference); a second read
 * can still be started from the collection page. Unsigned collections only (a signed one is locked).
 */
export async function collectionsAwaitingSecondRead(user: CurrentUser, limit = 10): Promise<AwaitingSecondRead[]> {
  if (!READER_ROLES.includes(user.role)) return [];
  const settings = await getLabSettings();
  const exists = (kinds: ReadKind[], status?: string) => (q: Knex.QueryBuilder) => {
    q.select(db.raw('1')).from('reads as r').whereRaw('r.collection_id = k.id').whereIn('r.kind', kinds);
    if (status) q.where('r.status', status);
  };
  const base = () =>
    db('collections as k')
      .join('stallions as s', 's.id', 'k.stallion_id')
      .join('reads as f', function () {
        this.on('f.collection_id', 'k.id').andOnVal('f.kind', FIRST_READ).andOnVal('f.status', SUBMITTED);
      })
      .join('users as u', 'u.id', 'f.reader_id')
      .whereNull('k.signed_report_id')
      .whereNot('f.reader_id', user.id)
      .whereNotExists(exists([SECOND_READ], OPEN))
      .whereNotExists(exists([SETTLED_READ]))
      .orderBy('k.collected_at', 'desc')
      .select('k.id', 'k.collected_at', 's.name as stallion', 'u.name as first_reader');
  const plain: Row[] = settings.secondReadRequired ? await base().whereNotExists(exists([SECOND_READ])).limit(limit) : [];
  // Recount candidates: a submitted second read by someone else; whether they differ takes the pairing.
  const paired: Row[] = await base()
    .whereExists(exists([SECOND_READ], SUBMITTED))
    .whereNotExists((q) => q.select(db.raw('1')).from('reads as x').whereRaw('x.collection_id = k.id').where('x.kind', SECOND_READ).where('x.reader_id', user.id))
    .limit(limit);
  const recount = await recountAdvisedAmong(user, new Map(paired.map((r) => [r.id as number, [{ kind: FIRST_READ, status: SUBMITTED }, { kind: SECOND_READ, status: SUBMITTED }] as const])));
  const out = [
    ...paired.filter((r) => recount.has(r.id)).map((r) => ({ r, recount: true })),
    ...plain.map((r) => ({ r, recount: false })),
  ];
  return out
    .sort((a, b) => new Date(b.r.collected_at).getTime() - new Date(a.r.collected_at).getTime())
    .slice(0, limit)
    .map(({ r, recount: rc }) => ({ id: r.id, collectedAt: new Date(r.collected_at).toISOString(), stallion: r.stallion, firstReader: r.first_reader, recount: rc }));
}

export type UserOverview = { active: Record<Role, number>; deactivated: number; invitationsOpen: number };

/** Accounts by role, for the lab manager. */
export async function userOverview(): Promise<UserOverview> {
  const rows: Row[] = await db('users').groupBy('role', 'active').select('role', 'active', db.raw('sum(password_hash is null) as invited')).count({ n: '*' });
  const active = Object.fromEntries(ROLES.map((r) => [r, 0])) as Record<Role, number>;
  let deactivated = 0;
  let invitationsOpen = 0;
  for (const r of rows) {
    if (r.active) {
      active[r.role as Role] += Number(r.n);
      invitationsOpen += Number(r.invited);
    } else deactivated += Number(r.n);
  }
  return { active, deactivated, invitationsOpen };
}

export type ReadyToSign = { id: number; collectedAt: string; stallion: string; basis: 'settled' | 'single' };

/**
 * The veterinarian's first work list: collections whose report can be signed now (never signed,
 * every read submitted, the second read and its settling done where the lab requires it), newest
 * first. A few candidates are picked in SQL, then each is checked by the report's own readiness.
 */
export async function collectionsReadyToSign(limit = 10): Promise<ReadyToSign[]> {
  const settings = await getLabSettings();
  const readsOf = (kinds: ReadKind[], status: string) => (q: Knex.QueryBuilder) =>
    q.select(db.raw('1')).from('reads as r').whereRaw('r.collection_id = k.id').whereIn('r.kind', kinds).where('r.status', status);
  const candidates: Row[] = await db('collections as k')
    .join('stallions as s', 's.id', 'k.stallion_id')
    .whereNull('k.signed_report_id')
    .whereNotExists((q) => q.select(db.raw('1')).from('report_versions as v').whereRaw('v.collection_id = k.id'))
    .whereExists(readsOf([FIRST_READ], SUBMITTED))
    .whereNotExists(readsOf([FIRST_READ, SECOND_READ, SETTLED_READ], OPEN))
    .modify((q) => {
      if (settings.secondReadRequired) q.whereExists(readsOf([SECOND_READ, SETTLED_READ], SUBMITTED));
    })
    .orderBy('k.collected_at', 'desc')
    .limit(limit * 2)
    .select('k.id', 'k.collected_at', 's.name as stallion');
  const out: ReadyToSign[] = [];
  for (const c of candidates) {
    if (out.length >= limit) break;
    const report = await collectionReport(db, c.id, { settings });
    if (report.readiness.ready && (report.draft.basis === 'settled' || report.draft.basis === 'single')) {
      out.push({ id: c.id, collectedAt: new Date(c.collected_at).toISOString(), stallion: c.stallion, basis: report.draft.basis });
    }
  }
  return out;
}

export type AmendedReport = { reportId: number; collectionId: number; version: number; stallion: string; collectedAt: string; amendedBy: string; amendedAt: string; reason: string };

/** Reports amended and not signed again: the veterinarian's second work list. */
export async function reportsAmendedNotResigned(limit = 10): Promise<AmendedReport[]> {
  const rows: Row[] = await db('report_versions as v')
    .join('collections as k', 'k.id', 'v.collection_id')
    .join('stallions as s', 's.id', 'k.stallion_id')
    .join('users as a', 'a.id', 'v.amended_by')
    .whereNotNull('v.amended_at')
    .whereNull('v.superseded_by')
    .orderBy('v.amended_at', 'desc')
    .limit(limit)
    .select('v.id', 'v.collection_id', 'v.version', 'v.amended_at', 'v.amend_reason', 'k.collected_at', 's.name as stallion', 'a.name as amended_by');
  return rows.map((r) => ({
    reportId: r.id,
    collectionId: r.collection_id,
    version: r.version,
    stallion: r.stallion,
    collectedAt: new Date(r.collected_at).toISOString(),
    amendedBy: r.amended_by,
    amendedAt: new Date(r.amended_at).toISOString(),
    reason: r.amend_reason,
  }));
}
