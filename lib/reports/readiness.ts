/**
 * Which read a collection's report rests on, and whether the report can be signed now. Pure:
 * db/queries/report-core.ts feeds it the collection's reads and the number of disagreements
 * between the submitted first and second reads (from lib/agreement).
 *
 * The report rests on, in this order:
 * - the latest submitted settled read ('settled');
 * - the submitted first read, when the submitted second read agrees with it cell for cell (no
 *   disagreement to settle, so the first read is the settled result: 'settled');
 * - the submitted first read alone, where the lab allows reports without a second read
 *   (secondReadRequired off) and none was submitted ('single');
 * - otherwise the submitted first read, in a draft preview only ('first-unchecked').
 */
import { FIRST_READ, OPEN, READ_KIND_LABELS, SECOND_READ, SETTLED_READ, SUBMITTED, type ReadKind, type ReadStatus } from '@/lib/reads/kinds';
import type { MorphologyBasis } from './draft';

export interface ReportRead {
  id: number;
  kind: ReadKind;
  status: ReadStatus;
  readerId: number;
  readerName: string;
}

/** The latest read of a kind that is submitted (reads are numbered by id). */
export function latestSubmitted<R extends ReportRead>(reads: readonly R[], kind: ReadKind): R | null {
  return reads.filter((r) => r.kind === kind && r.status === SUBMITTED).sort((a, b) => b.id - a.id)[0] ?? null;
}

export interface ReportReads<R extends ReportRead> {
  first: R | null;
  second: R | null;
  settled: R | null;
}

export function reportReads<R extends ReportRead>(reads: readonly R[]): ReportReads<R> {
  return { first: latestSubmitted(reads, FIRST_READ), second: latestSubmitted(reads, SECOND_READ), settled: latestSubmitted(reads, SETTLED_READ) };
}

export interface ReportBasis<R extends ReportRead> {
  read: R;
  basis: MorphologyBasis;
}

/** The read the report's morphology comes from (see the module comment), or null before any read is submitted. */
export function reportBasis<R extends ReportRead>(reads: readonly R[], opts: { secondReadRequired: boolean; disagreements: number | null }): ReportBasis<R> | null {
  const { first, second, settled } = reportReads(reads);
  if (settled) return { read: settled, basis: 'settled' };
  if (!first) return null;
  if (second && opts.disagreements === 0) return { read: first, basis: 'settled' };
  if (!second && !opts.secondReadRequired) return { read: first, basis: 'single' };
  return { read: first, basis: 'first-unchecked' };
}

export type ReadinessCode =
  | 'already_signed'
  | 'lab_name_missing'
  | 'no_read'
  | 'read_open'
  | 'second_read_missing'
  | 'disagreements_unsettled'
  | 'agreement_incomplete';

export type ReadinessReason = { code: ReadinessCode; message: string };

export interface ReadinessInput {
  /** The version that locks the collection now, if any. */
  signedVersion: number | null;
  labName: string;
  secondReadRequired: boolean;
  reads: readonly ReportRead[];
  /** Disagreements between the submitted first and second read; null unless both are submitted. */
  disagreements: number | null;
  /** Whether the agreement figures could be worked out (paired sperm cells in both reads); null without a second read. */
  agreementComplete: boolean | null;
}

export type Readiness = { ready: boolean; reasons: ReadinessReason[] };

const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

/** Why the report cannot be signed now (every reason at once), or ready. */
export function readinessToSign(i: ReadinessInput): Readiness {
  const reasons: ReadinessReason[] = [];
  const add = (code: ReadinessCode, message: string) => reasons.push({ code, message });
  if (i.signedVersion !== null) add('already_signed', `Version ${i.signedVersion} of this report is signed; amend it to change the report.`);
  if (!i.labName.trim()) add('lab_name_missing', 'The lab’s name is not set: a signed report prints it. The lab manager sets it under Lab settings.');
  for (const r of i.reads.filter((x) => x.status === OPEN)) {
    add('read_open', `The ${READ_KIND_LABELS[r.kind].toLowerCase()} by ${r.readerName} is still open: it must be submitted before the report is signed.`);
  }
  const { first, second, settled } = reportReads(i.reads);
  if (!first && !settled) add('no_read', 'No read of this collection has been submitted yet.');
  // A settled read always rests on a second read (it names the second reader and its agreement figures).
  if (!second && (settled || (first && i.secondReadRequired))) {
    add('second_read_missing', 'The lab requires a second read before a report (Lab settings), and no second read is submitted.');
  }
  if (!settled && i.disagreements !== null && i.disagreements > 0) {
    add('disagreements_unsettled', `${plural(i.disagreements, 'disagreement', 'disagreements')} between the first and the second read ${i.disagreements === 1 ? 'is' : 'are'} not settled.`);
  }
  if (second && i.agreementComplete === false) {
    add('agreement_incomplete', 'The two reads share no paired sperm cells, so the agreement figures cannot be worked out; check the reads.');
  }
  return { ready: reasons.length === 0, reasons };
}
