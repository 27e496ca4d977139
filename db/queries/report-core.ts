/**
 * A collection's report from the database: everything the report needs from the records and
 * the reads, whether it can be signed, and the signing and amending transactions themselves.
 * Takes its database as an argument (no `server-only`), because the demo seed signs its reports
 * with the same code under tsx; the app uses it through db/queries/report-inputs.ts and
 * db/queries/reports.ts, which bind the app's pool and check the acting user.
 *
 * Figures: the reads' live marks are loaded once (the agreement figures pair them) and handed
 * to the one morphology engine through countMarks, as the workbench does; semen arithmetic and
 * the breeding-soundness check come from lib/semen, agreement from lib/agreement. Nothing here
 * totals anything itself.
 */
import type { Knex } from 'knex';
import type { CollectionAgreement } from '@/lib/agreement/agreement';
import { ApiError, conflict, notFound } from '@/lib/api/errors';
import { morphologyOfRead, type Morphology } from '@/lib/morphology/engine';
import { countMarks } from '@/lib/morphology/tally';
import { composeReportDraft, reportAgreementOf, signDraft, type Preparation, type Optics, type ReportContent } from '@/lib/reports/draft';
import { readinessToSign, reportBasis, type Readiness, type ReportBasis, type ReportRead } from '@/lib/reports/readiness';
import type { ReportHealthEvent, ReportSnapshot } from '@/lib/reports/snapshot';
import { newVerificationCode } from '@/lib/reports/verification';
import { blindingRead } from '@/lib/reads/policy';
import { pairedReads, type PairingSettings, type ReportReadRow } from './agreement-core';
import { mergeLabSettings, type LabSettings } from '@/lib/settings/lab-settings';
import { flagCollections, spermatogenicWindow } from '@/lib/windows/window';
import { HEALTH_EVENT_KIND_LABELS, describeHealthEvent, type HealthEventKind } from '@/lib/health/kinds';
import { enqueuePdf } from '@/lib/reports/pdf-jobs';
import { json, type Row } from '../row';

type K = Knex | Knex.Transaction;

/** The lab's settings as stored (the app's getLabSettings caches per render; this reads the row). */
export async function labSettingsOf(k: K): Promise<LabSettings> {
  const row = await k('lab_settings').where({ key: 'lab' }).first('value');
  return mergeLabSettings(row ? json(row.value) : null);
}

async function audit(k: K, e: { userId: number; action: string; entity: string; entityId: number; before?: unknown; after?: unknown; reason?: string | null }) {
  await k('audit_log').insert({
    user_id: e.userId,
    action: e.action,
    entity: e.entity,
    entity_id: String(e.entityId),
    before: e.before === undefined ? null : JSON.stringify(e.before),
    after: e.after === undefined ? null : JSON.stringify(e.after),
    reason: e.reason ?? null,
  });
}

// ---------------------------------------------------------------------------
// Reads

// The read rows and the pairing live in db/queries/agreement-core.ts (shared with the agreement
// route and the lists); re-exported here for the report code that imported them from this module.
export { collectionReads, type ReportReadRow } from './agreement-core';

/** Everything the report needs from the reads of a collection. */
export interface ReadsForReport {
  reads: ReportReadRow[];
  /** The read the morphology comes from, and how (lib/reports/readiness.ts). */
  basis: ReportBasis<ReportReadRow> | null;
  morphology: Morphology | null;
  /** The submitted first and second reads' agreement; null unless both exist. */
  agreement: CollectionAgreement | null;
  people: { readBy: string | null; checkedBy: string | null; settledBy: string | null };
}

export async function readsForReport(
  k: K,
  collectionId: number,
  settings: Pick<LabSettings, 'secondReadRequired'> & PairingSettings,
): Promise<ReadsForReport> {
  const { reads, first, second, settled, marks, agreement } = await pairedReads(k, collectionId, settings);

  const basis = reportBasis(reads, { secondReadRequired: settings.secondReadRequired, disagreements: agreement ? agreement.disagreements.length : null });
  const morphology = basis
    ? morphologyOfRead({ classSet: basis.read.classSet, targetCells: basis.read.targetCells }, countMarks(marks.get(basis.read.id)!))
    : null;
  const checked = basis?.basis === 'settled';
  return {
    reads,
    basis,
    morphology,
    agreement,
    people: {
      readBy: first?.readerName ?? null,
      checkedBy: checked ? (second?.readerName ?? null) : null,
      settledBy: checked && settled && settled.readerId !== second?.readerId ? settled.readerName : null,
    },
  };
}

// ---------------------------------------------------------------------------
// Health events

/**
 * The health events whose spermatogenic window covers the collection, in the shape of a report
 * snapshot's `healthEvents` (lib/reports/snapshot.ts): kind as its label, the particulars (peak
 * temperature, notes) as the description, the collection's day of each window, the window's length
 * and the date it clears (a window runs on after an event's last day), with the given settings.
 * The one implementation: the stallion-history queries (db/queries/health-events.ts) and the demo
 * seed call it too.
 */
export async function healthEventsCoveringCollection(
  k: K,
  c: { stallionId: number; collectedAt: string },
  settings: Pick<LabSettings, 'spermatogenesisDays' | 'epididymalTransitDays' | 'timeZone'>,
): Promise<ReportHealthEvent[]> {
  const ws = { spermatogenesisDays: settings.spermatogenesisDays, epididymalTransitDays: settings.epididymalTransitDays, timeZone: settings.timeZone };
  const rows: Row[] = await k('health_events').where({ stallion_id: c.stallionId }).orderBy('started_on').orderBy('id').select('id', 'kind', 'started_on', 'ended_on', 'peak_temperature_c', 'notes');
  return rows.flatMap((r) => {
    const [flag] = flagCollections([{ id: String(r.id), startDate: r.started_on, endDate: r.ended_on }], [{ id: 'c', collectedAt: c.collectedAt }], ws);
    const covering = flag?.window?.events[0];
    if (!covering) return [];
    const w = spermatogenicWindow(r.started_on, ws, r.ended_on);
    return [{
      kind: HEALTH_EVENT_KIND_LABELS[r.kind as HealthEventKind],
      description: describeHealthEvent({ peakTemperatureC: r.peak_temperature_c == null ? null : Number(r.peak_temperature_c), notes: r.notes }),
      startedOn: r.started_on,
      endedOn: r.ended_on ?? null,
      dayOfWindow: covering.windowDay,
      windowDays: w.totalDays,
      windowClearsOn: w.clearsDate,
    }];
  });
}

// ---------------------------------------------------------------------------
// The draft and its readiness

export interface CollectionReportState {
  collectionId: number;
  stallionId: number;
  clientId: number;
  /** The version that locks the collection now (signed and not amended), or null. */
  signedReportId: number | null;
  draft: ReportContent;
  readiness: Readiness;
  reads: ReportReadRow[];
}

export interface ReportInputOptions {
  settings?: LabSettings;
  /**
   * Leave the reads' figures out (a second reader whose blind read is open must not see the
   * first read's figures, here as anywhere).
   */
  blind?: boolean;
}

export async function collectionReport(k: K, collectionId: number, opts: ReportInputOptions = {}): Promise<CollectionReportState> {
  const settings = opts.settings ?? (await labSettingsOf(k));
  const c: Row | undefined = await k('collections as k')
    .join('stallions as s', 's.id', 'k.stallion_id')
    .leftJoin('clients as o', 'o.id', 's.client_id')
    .where('k.id', collectionId)
    .first(
      'k.*',
      's.name as stallion_name',
      's.breed',
      's.registration',
      's.foaling_year',
      's.client_id',
      'o.name as owner_name',
      k.raw('(select max(p.collected_at) from collections p where p.stallion_id = k.stallion_id and p.collected_at < k.collected_at) as previous_at'),
    );
  if (!c) throw notFound('The collection');
  const at = new Date(c.collected_at);
  const [reads, around, events, text, signed] = await Promise.all([
    readsForReport(k, collectionId, settings),
    k('collections')
      .where('stallion_id', c.stallion_id)
      .whereBetween('collected_at', [new Date(at.getTime() - 6 * 36e5), new Date(at.getTime() + 6 * 36e5)])
      .orderBy('collected_at')
      .select('id', 'collected_at') as Promise<Row[]>,
    healthEventsCoveringCollection(k, { stallionId: c.stallion_id, collectedAt: at.toISOString() }, settings),
    k('report_drafts').where({ collection_id: collectionId }).first('remarks', 'interpretation') as Promise<Row | undefined>,
    c.signed_report_id ? (k('report_versions').where({ id: c.signed_report_id }).first('version') as Promise<Row | undefined>) : Promise.resolve(undefined),
  ]);
  const figures = opts.blind ? { basis: null, morphology: null, agreement: null } : reads;
  const draft = composeReportDraft({
    settings,
    stallion: { id: c.stallion_id, name: c.stallion_name, breed: c.breed, registration: c.registration, foalingYear: c.foaling_year, ownerName: c.owner_name ?? null },
    collection: {
      id: c.id,
      collectedAt: at.toISOString(),
      numberThatDay: c.number_that_day,
      previousCollectedAt: c.previous_at ? new Date(c.previous_at).toISOString() : null,
      preparation: c.preparation as Preparation,
      optics: c.optics as Optics,
      magnification: c.magnification,
      collectedBy: c.collected_by,
      remarks: c.remarks,
      volumeMl: c.volume_ml,
      concentrationMillionPerMl: c.concentration_m_per_ml,
      concentrationMethod: c.concentration_method,
      totalMotilityPct: c.total_motility_pct,
      progressiveMotilityPct: c.progressive_motility_pct,
    },
    around: around.map((r) => ({ id: r.id, collectedAt: new Date(r.collected_at).toISOString() })),
    morphology: figures.basis && figures.morphology ? { basis: figures.basis.basis, classSet: figures.basis.read.classSet, morphology: figures.morphology } : null,
    agreement: figures.agreement,
    healthEvents: events,
    veterinarian: { remarks: text?.remarks ?? null, interpretation: text?.interpretation ?? null },
    people: reads.people,
  });
  const readiness = readinessToSign({
    signedVersion: signed?.version ?? null,
    labName: settings.labName,
    secondReadRequired: settings.secondReadRequired,
    reads: reads.reads,
    // Blind: not even how many disagreements the other reads have.
    disagreements: reads.agreement && !opts.blind ? reads.agreement.disagreements.length : null,
    agreementComplete: reads.agreement && !opts.blind ? reportAgreementOf(reads.agreement) !== null : null,
  });
  return { collectionId: c.id, stallionId: c.stallion_id, clientId: c.client_id, signedReportId: c.signed_report_id ?? null, draft, readiness, reads: reads.reads };
}

/**
 * Whether `userId` reads an open second read of this collection, and is therefore blind to the
 * other reads' figures (lib/reads/policy.ts blindingRead, the one rule).
 */
export function isBlindTo(userId: number, reads: readonly ReportRead[]): boolean {
  return blindingRead({ id: userId }, reads) !== null;
}

// ---------------------------------------------------------------------------
// Sign-off and amendment

export interface SignInput {
  collectionId: number;
  signer: { id: number; name: string };
  at: Date;
  /** Remarks and interpretation to save with the signing (else the saved draft text is used). */
  text?: { remarks: string | null; interpretation: string | null };
  /** For examples and the demo seed only: a code from a deterministic source. */
  verificationCode?: string;
}

export interface SignedReport {
  reportId: number;
  version: number;
  verificationCode: string;
  snapshot: ReportSnapshot;
}

/**
 * Signs the collection's report inside the caller's transaction (the password is checked by the
 * caller): freezes the snapshot, records the version, locks the collection and queues the PDF.
 * 409 with every reason when the report cannot be signed.
 */
export async function signReportTx(trx: Knex.Transaction, input: SignInput): Promise<SignedReport> {
  const locked = await trx('collections').where({ id: input.collectionId }).forUpdate().first('id', 'signed_report_id');
  if (!locked) throw notFound('The collection');
  if (input.text && !locked.signed_report_id) {
    await trx('report_drafts')
      .insert({ collection_id: input.collectionId, remarks: input.text.remarks, interpretation: input.text.interpretation, updated_by: input.signer.id, updated_at: input.at })
      .onConflict('collection_id')
      .merge();
  }
  const state = await collectionReport(trx, input.collectionId);
  if (!state.readiness.ready) {
    throw new ApiError(409, 'not_ready', `The report cannot be signed yet: ${state.readiness.reasons.map((r) => r.message).join(' ')}`, state.readiness.reasons.map((r) => ({ path: r.code, message: r.message })));
  }
  const previous: Row | undefined = await trx('report_versions as v')
    .leftJoin('users as a', 'a.id', 'v.amended_by')
    .where('v.collection_id', input.collectionId)
    .orderBy('v.version', 'desc')
    .forUpdate()
    .first('v.id', 'v.version', 'v.amended_at', 'v.amend_reason', 'v.superseded_by', 'a.name as amended_by_name');
  if (previous && (!previous.amended_at || previous.superseded_by)) throw conflict(`Version ${previous.version} of this report is signed; amend it to change the report.`);
  const version = previous ? previous.version + 1 : 1;
  const verificationCode = input.verificationCode ?? newVerificationCode();
  const snapshot = signDraft(state.draft, {
    signedBy: { name: input.signer.name, qualifications: null },
    signedAt: input.at.toISOString(),
    version,
    verificationCode,
    supersedes: previous
      ? { version: previous.version, reason: previous.amend_reason, by: previous.amended_by_name, at: new Date(previous.amended_at).toISOString() }
      : null,
  });
  const [reportId] = await trx('report_versions').insert({
    collection_id: input.collectionId,
    version,
    snapshot: JSON.stringify(snapshot),
    verification_code: verificationCode,
    signed_by: input.signer.id,
    signed_at: input.at,
  });
  if (previous) await trx('report_versions').where({ id: previous.id }).update({ superseded_by: reportId });
  await trx('collections').where({ id: input.collectionId }).update({ signed_report_id: reportId });
  await enqueuePdf(trx, reportId);
  await audit(trx, {
    userId: input.signer.id,
    action: 'sign',
    entity: 'report',
    entityId: reportId,
    after: { collectionId: input.collectionId, version, verificationCode, supersedes: previous ? previous.id : null, pctNormal: snapshot.morphology.pctNormal, source: snapshot.morphology.source },
  });
  return { reportId, version, verificationCode, snapshot };
}

/**
 * Amends a signed version inside the caller's transaction: records who, when and why, and
 * unlocks the collection for correction. The version stays readable; signing again makes the
 * next version, which supersedes it.
 */
export async function amendReportTx(trx: Knex.Transaction, input: { reportId: number; by: { id: number }; reason: string; at: Date }): Promise<{ collectionId: number; version: number }> {
  const row = await trx('report_versions').where({ id: input.reportId }).forUpdate().first('id', 'collection_id', 'version', 'amended_at', 'superseded_by');
  if (!row) throw notFound('The report');
  if (row.superseded_by) throw conflict(`Version ${row.version} is already superseded by a later version; amend the current one.`);
  if (row.amended_at) throw conflict(`Version ${row.version} is already being amended; sign the corrected report to make the next version.`);
  await trx('report_versions').where({ id: row.id }).update({ amended_at: input.at, amended_by: input.by.id, amend_reason: input.reason });
  await trx('collections').where({ id: row.collection_id, signed_report_id: row.id }).update({ signed_report_id: null });
  await audit(trx, { userId: input.by.id, action: 'amend', entity: 'report', entityId: row.id, before: { status: 'current', version: row.version }, after: { status: 'amended', version: row.version, collectionId: row.collection_id }, reason: input.reason });
  return { collectionId: row.collection_id, version: row.version };
}
