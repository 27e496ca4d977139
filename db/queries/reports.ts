import 'server-only';
import bcrypt from 'bcryptjs';
import type { Knex } from 'knex';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { collectionReportFor } from '@/db/queries/report-inputs';
import { json, type Row } from '@/db/row';
import { ApiError, conflict, forbidden, notFound } from '@/lib/api/errors';
import { signInSucceeded, takeSignInAttempt } from '@/lib/auth/rate-limit';
import type { CurrentUser } from '@/lib/auth/session';
import { isStaff } from '@/lib/auth/roles';
import { contentOfSnapshot, type ReportContent } from '@/lib/reports/draft';
import { enqueuePdf, sha256Hex } from '@/lib/reports/pdf-jobs';
import { wakeWorker } from '@/lib/workers/wake';
import type { Readiness } from '@/lib/reports/readiness';
import { markSuperseded, parseReportSnapshot, type ReportAmendmentLink, type ReportSnapshot } from '@/lib/reports/snapshot';
import { pdfStateOf, reportStatusOf, type PdfState, type ReportStatus } from '@/lib/reports/status';
import type { Page } from '@/lib/validations/fields';
import type { ReportListQuery, ReportTextValues, SignReportValues } from '@/lib/validations/report';
import * as storage from '@/storage/s3';
import { amendReportTx, signReportTx } from './report-core';

/*
 * Signed reports for every screen and route. Clients see the signed versions of their own
 * stallions only (every query here that a client can reach filters by the signed-in user's
 * client id); drafts are staff business. Sign-off and amendment are the veterinarian's, with the
 * work in db/queries/report-core.ts.
 */

export type ReportListItem = {
  id: number;
  collectionId: number;
  stallionId: number;
  stallionName: string;
  collectedAt: string;
  version: number;
  status: ReportStatus;
  signedBy: string;
  signedAt: string;
  verificationCode: string;
  pdf: PdfState;
};

const SELECT_VERSION = [
  'v.id', 'v.collection_id', 'v.version', 'v.verification_code', 'v.signed_at', 'v.amended_at', 'v.amend_reason', 'v.superseded_by',
  'v.pdf_key', 'v.pdf_sha256', 'v.pdf_bytes', 'v.pdf_stored_at',
  'k.collected_at', 's.id as stallion_id', 's.name as stallion_name', 's.client_id',
  'u.name as signed_by_name', 'j.status as job_status', 'j.attempts as job_attempts', 'j.error as job_error', 'j.run_after as job_run_after',
];

function versions(k: Knex | Knex.Transaction = db) {
  return k('report_versions as v')
    .join('collections as k', 'k.id', 'v.collection_id')
    .join('stallions as s', 's.id', 'k.stallion_id')
    .join('users as u', 'u.id', 'v.signed_by')
    .leftJoin('report_pdf_jobs as j', 'j.report_id', 'v.id');
}

/** Clients: the versions of their own stallions only. Staff: all. */
function visibleTo(actor: CurrentUser, q: Knex.QueryBuilder): Knex.QueryBuilder {
  if (!isStaff(actor.role)) q.where('s.client_id', actor.role === 'client' ? (actor.clientId ?? -1) : -1);
  return q;
}

function toItem(r: Row): ReportListItem {
  return {
    id: r.id,
    collectionId: r.collection_id,
    stallionId: r.stallion_id,
    stallionName: r.stallion_name,
    collectedAt: new Date(r.collected_at).toISOString(),
    version: r.version,
    status: reportStatusOf(r),
    signedBy: r.signed_by_name,
    signedAt: new Date(r.signed_at).toISOString(),
    verificationCode: r.verification_code,
    pdf: pdfStateOf(r),
  };
}

const SORT = { signedAt: 'v.signed_at', collectedAt: 'k.collected_at', stallion: 's.name' } as const;

/** The signed versions the actor may see, newest first unless asked otherwise, one page. */
export async function listReports(actor: CurrentUser, q: ReportListQuery): Promise<Page<ReportListItem>> {
  const filter = (b: Knex.QueryBuilder) => {
    visibleTo(actor, b);
    if (q.stallionId) b.where('s.id', q.stallionId);
    if (q.status === 'current') b.whereNull('v.superseded_by').whereNull('v.amended_at');
    if (q.status === 'amended') b.whereNull('v.superseded_by').whereNotNull('v.amended_at');
    if (q.status === 'superseded') b.whereNotNull('v.superseded_by');
    if (q.status === 'latest') b.whereNull('v.superseded_by');
    if (q.q) b.where((w) => w.where('s.name', 'like', `%${q.q!.replace(/[\\%_]/g, (c) => `\\${c}`)}%`).orWhere('v.verification_code', q.q!.toUpperCase()));
    return b;
  };
  const [{ n }] = await filter(versions()).count({ n: '*' });
  const rows: Row[] = await filter(versions())
    .select(SELECT_VERSION)
    .orderBy(SORT[q.sort], q.dir)
    .orderBy('v.id', q.dir)
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize);
  return { rows: rows.map(toItem), total: Number(n), page: q.page, pageSize: q.pageSize };
}

export type ReportSending = { id: number; recipient: string; status: 'sent' | 'failed'; relayResponse: string | null; sentBy: string; sentAt: string; note: string | null };

export type ReportDetail = ReportListItem & {
  /** The snapshot exactly as frozen at signing. */
  snapshot: ReportSnapshot;
  /** What the report page shows: the frozen content, marked "superseded by version N" once it is. */
  content: ReportContent;
  amendment: { reason: string; by: string; at: string } | null;
  supersededBy: ReportAmendmentLink | null;
  /** Every signed version of this collection's report, oldest first. */
  versions: { id: number; version: number; status: ReportStatus }[];
  /** Staff only: every sending of this version by e-mail. */
  sendings: ReportSending[];
  clientId: number;
  /** Staff only: the owner's e-mail address on record (where the report is sent). */
  ownerEmail: string | null;
};

/** One signed version, as the actor may see it (404 for a client's request for another owner's report). */
export async function getReport(actor: CurrentUser, id: number): Promise<ReportDetail> {
  const r: Row | undefined = await visibleTo(actor, versions().where('v.id', id))
    .leftJoin('users as a', 'a.id', 'v.amended_by')
    .leftJoin('clients as o', 'o.id', 's.client_id')
    .first([...SELECT_VERSION, 'v.snapshot', 'a.name as amended_by_name', 'o.email as owner_email']);
  if (!r) throw notFound('The report');
  const snapshot = parseReportSnapshot(r.snapshot);
  const [all, next, sendings] = await Promise.all([
    db('report_versions').where({ collection_id: r.collection_id }).orderBy('version').select('id', 'version', 'amended_at', 'superseded_by') as Promise<Row[]>,
    r.superseded_by ? (db('report_versions').where({ id: r.superseded_by }).first('version') as Promise<Row | undefined>) : Promise.resolve(undefined),
    isStaff(actor.role) ? listSendings(id) : Promise.resolve([]),
  ]);
  const amendment = r.amended_at ? { reason: r.amend_reason as string, by: r.amended_by_name as string, at: new Date(r.amended_at).toISOString() } : null;
  const supersededBy = next && amendment ? { version: next.version as number, reason: amendment.reason, by: amendment.by, at: amendment.at } : null;
  return {
    ...toItem(r),
    snapshot,
    content: contentOfSnapshot(supersededBy ? markSuperseded(snapshot, supersededBy) : snapshot),
    amendment,
    supersededBy,
    versions: all.map((v) => ({ id: v.id, version: v.version, status: reportStatusOf(v) })),
    sendings,
    clientId: r.client_id,
    ownerEmail: isStaff(actor.role) ? (r.owner_email ?? null) : null,
  };
}

async function listSendings(reportId: number): Promise<ReportSending[]> {
  const rows: Row[] = await db('report_sendings as e').join('users as u', 'u.id', 'e.sent_by').where('e.report_id', reportId).orderBy('e.sent_at', 'desc').orderBy('e.id', 'desc').select('e.*', 'u.name as sent_by_name');
  return rows.map((e) => ({ id: e.id, recipient: e.recipient, status: e.status, relayResponse: e.relay_response, sentBy: e.sent_by_name, sentAt: new Date(e.sent_at).toISOString(), note: e.note }));
}

export type CollectionReportState = 'draft' | 'signed' | 'amended';

export interface CollectionReportView {
  collectionId: number;
  /** draft: never signed; signed: a current version locks the collection; amended: the last version is withdrawn for correction. */
  state: CollectionReportState;
  /** The report as it stands now, unsigned (what signing would freeze). */
  draft: ReportContent;
  readiness: Readiness;
  /** The actor reads this collection's blind second read: no read's figures are shown. */
  blind: boolean;
  versions: ReportListItem[];
  /** The version that locks the collection, when signed. */
  current: ReportListItem | null;
}

/** The report of a collection for the staff: the draft, whether it can be signed, and every signed version. */
export async function getCollectionReport(actor: CurrentUser, collectionId: number): Promise<CollectionReportView> {
  if (!isStaff(actor.role)) throw forbidden('Drafts are for the lab staff; signed reports are under My stallions.');
  const report = await collectionReportFor(actor, collectionId);
  const rows: Row[] = await versions().where('v.collection_id', collectionId).orderBy('v.version').select(SELECT_VERSION);
  const all = rows.map(toItem);
  const last = all[all.length - 1] ?? null;
  const state: CollectionReportState = report.signedReportId ? 'signed' : last?.status === 'amended' ? 'amended' : 'draft';
  return {
    collectionId,
    state,
    draft: report.draft,
    readiness: report.readiness,
    blind: report.blind,
    versions: all,
    current: report.signedReportId ? (all.find((v) => v.id === report.signedReportId) ?? null) : null,
  };
}

/** The collection page's one line about its report. */
export async function collectionReportState(collectionId: number): Promise<{ state: CollectionReportState; version: number | null; reportId: number | null }> {
  const c = await db('collections').where({ id: collectionId }).first('signed_report_id');
  const last = await db('report_versions').where({ collection_id: collectionId }).orderBy('version', 'desc').first('id', 'version', 'amended_at', 'superseded_by');
  if (c?.signed_report_id && last) return { state: 'signed', version: last.version, reportId: last.id };
  if (last && last.amended_at && !last.superseded_by) return { state: 'amended', version: last.version, reportId: last.id };
  return { state: 'draft', version: null, reportId: null };
}

/** The veterinarian's remarks and interpretation, saved before signing (refused once signed: the database lock). */
export async function saveReportText(actor: CurrentUser, collectionId: number, v: ReportTextValues): Promise<ReportTextValues> {
  if (actor.role !== 'veterinarian') throw forbidden('Only a veterinarian writes the report’s remarks and interpretation.');
  return db.transaction(async (trx) => {
    const c = await trx('collections').where({ id: collectionId }).forUpdate().first('id');
    if (!c) throw notFound('The collection');
    const before = await trx('report_drafts').where({ collection_id: collectionId }).first('remarks', 'interpretation');
    await trx('report_drafts')
      .insert({ collection_id: collectionId, remarks: v.remarks, interpretation: v.interpretation, updated_by: actor.id, updated_at: trx.fn.now(3) })
      .onConflict('collection_id')
      .merge();
    await writeAudit(trx, { userId: actor.id, action: 'update', entity: 'report_draft', entityId: collectionId, before: before ?? null, after: v });
    return v;
  });
}

/**
 * Sign-off: a veterinarian only, with their password re-entered (checked like a sign-in and
 * counted against the same limits; the password is never recorded). The report is frozen and
 * the collection locked in one transaction; the PDF is rendered after it commits.
 */
export async function signReport(actor: CurrentUser, collectionId: number, body: SignReportValues, address: string) {
  if (actor.role !== 'veterinarian') throw forbidden('Only a veterinarian signs reports.');
  const gate = await takeSignInAttempt(actor.email, address);
  if (!gate.ok) {
    await writeAudit(db, { userId: actor.id, action: 'sign_off_refused', entity: 'collection', entityId: collectionId, after: { reason: 'rate_limited', address } });
    throw new ApiError(429, 'rate_limited', `Too many password attempts. Wait ${gate.retryAfter} s and try again.`);
  }
  const user = await db('users').where({ id: actor.id }).first('password_hash');
  const matches = Boolean(user?.password_hash) && (await bcrypt.compare(body.password, user!.password_hash));
  if (!matches) {
    await writeAudit(db, { userId: actor.id, action: 'sign_off_refused', entity: 'collection', entityId: collectionId, after: { reason: 'wrong_password', address } });
    throw new ApiError(401, 'wrong_password', 'That is not your password; the report was not signed. Enter the password you sign in with.');
  }
  await signInSucceeded(actor.email, address);
  const text = body.remarks !== undefined || body.interpretation !== undefined ? { remarks: body.remarks ?? null, interpretation: body.interpretation ?? null } : undefined;
  const signed = await db.transaction((trx) => signReportTx(trx, { collectionId, signer: { id: actor.id, name: actor.name }, at: new Date(), text }));
  wakeWorker('report-pdf');
  return getReport(actor, signed.reportId);
}

/** Amendment: a veterinarian withdraws a current version with a reason; the collection opens for correction. */
export async function amendReport(actor: CurrentUser, reportId: number, reason: string) {
  if (actor.role !== 'veterinarian') throw forbidden('Only a veterinarian amends reports.');
  await db.transaction((trx) => amendReportTx(trx, { reportId, by: { id: actor.id }, reason, at: new Date() }));
  return getReport(actor, reportId);
}

/** The stored PDF, byte for byte, after checking it against its recorded SHA-256. */
export async function reportPdf(actor: CurrentUser, reportId: number): Promise<{ bytes: Buffer; sha256: string; snapshot: ReportSnapshot }> {
  const r: Row | undefined = await visibleTo(actor, versions().where('v.id', reportId)).first([...SELECT_VERSION, 'v.snapshot']);
  if (!r) throw notFound('The report');
  const state = pdfStateOf(r);
  if (state.status === 'preparing') throw new ApiError(409, 'pdf_preparing', 'The PDF is still being prepared; it is ready in a moment.');
  if (state.status === 'failed') throw new ApiError(409, 'pdf_failed', `The PDF could not be made: ${state.error} A veterinarian or the lab manager can retry it on the report page.`);
  const bytes = await storage.getBuffer(r.pdf_key);
  if (sha256Hex(bytes) !== r.pdf_sha256) {
    console.error('[fieldmark] stored report PDF does not match its checksum', reportId, r.pdf_key);
    throw new ApiError(500, 'pdf_corrupt', 'The stored PDF does not match its recorded checksum; it was not sent. Tell the lab manager.');
  }
  return { bytes, sha256: r.pdf_sha256, snapshot: parseReportSnapshot(r.snapshot) };
}

/** Queues a failed PDF again (a veterinarian or the lab manager). */
export async function retryReportPdf(actor: CurrentUser, reportId: number): Promise<PdfState> {
  if (actor.role !== 'veterinarian' && actor.role !== 'lab_manager') throw forbidden('Only a veterinarian or the lab manager retries a PDF.');
  await db.transaction(async (trx) => {
    const r = await trx('report_versions as v').leftJoin('report_pdf_jobs as j', 'j.report_id', 'v.id').where('v.id', reportId).forUpdate().first('v.id', 'v.pdf_sha256', 'j.status');
    if (!r) throw notFound('The report');
    if (r.pdf_sha256) throw conflict('This version’s PDF is stored already; it never changes.');
    if (r.status === 'running' || r.status === 'waiting') throw conflict('The PDF is being prepared already.');
    await enqueuePdf(trx, reportId);
    await writeAudit(trx, { userId: actor.id, action: 'retry_pdf', entity: 'report', entityId: reportId, before: { status: r.status ?? null } });
  });
  wakeWorker('report-pdf');
  return (await getReport(actor, reportId)).pdf;
}

/** What /verify/{code} shows, and nothing else. */
export type Verification = {
  stallionName: string;
  collectedOn: string;
  version: number;
  signedBy: string;
  signedAt: string;
  status: ReportStatus;
  supersededByVersion: number | null;
  pdfSha256: string | null;
  timeZone: string;
};

/** A signed version by its verification code, for anyone holding the code. */
export async function verifyReport(code: string): Promise<Verification | null> {
  const r: Row | undefined = await db('report_versions as v')
    .leftJoin('report_versions as n', 'n.id', 'v.superseded_by')
    .where('v.verification_code', code)
    .first('v.version', 'v.signed_at', 'v.amended_at', 'v.superseded_by', 'v.pdf_sha256', 'v.snapshot', 'n.version as next_version');
  if (!r) return null;
  // The names and dates as signed (the stallion may have been renamed since).
  const s = json<ReportSnapshot>(r.snapshot);
  return {
    stallionName: s.stallion.name,
    collectedOn: s.collection.collectedAt,
    version: r.version,
    signedBy: s.people.signedBy.name,
    signedAt: new Date(r.signed_at).toISOString(),
    status: reportStatusOf(r),
    supersededByVersion: r.next_version ?? null,
    pdfSha256: r.pdf_sha256 ?? null,
    timeZone: s.settings.timeZone,
  };
}
