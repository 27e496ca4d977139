/**
 * Settling a collection in the database: its settle state (the disagreements between the
 * submitted first and second reads, with both marks, the images and the decisions so far) and
 * the decisions' transaction, which writes the settled read once every disagreement is decided.
 * Takes its database as an argument (no `server-only`): the demo seed settles with the same code
 * under tsx; the app binds its pool and the acting user in db/queries/settling.ts.
 *
 * The pairing and the disagreements are the report's (readsForReport, lib/agreement); the
 * settled read's marks come from lib/settling/settle.ts; its totals from the one morphology
 * engine, like every read's. Nothing here totals anything itself.
 */
import type { Knex } from 'knex';
import type { Disagreement } from '@/lib/agreement/agreement';
import { ApiError } from '@/lib/api/errors';
import type { Role } from '@/lib/auth/roles';
import type { ClassSet } from '@/lib/class-sets/schema';
import { SETTLED_READ, SUBMITTED } from '@/lib/reads/kinds';
import { buildSettledRead, decisionsInForce, settleProgress, whyNotDecision, type SettleDecision, type SettleDecisionKind, type SettleProgress } from '@/lib/settling/settle';
import { openReadOf, settleReads, whySettleRefused } from '@/lib/settling/policy';
import type { LabSettings } from '@/lib/settings/lab-settings';
import type { FieldImageRef, ScoringMark } from '@/lib/scoring/types';
import type { SendResult } from '@/lib/scoring/sync-contract';
import type { PairingSettings } from './agreement-core';
import { audit, readsForReport, type ReportPairingMark, type ReportReadRow } from './report-core';
import type { Row } from '../row';

type K = Knex | Knex.Transaction;

export interface SettleActor {
  id: number;
  role: Role;
}

export interface DecisionView {
  decision: SettleDecisionKind;
  classKey: string | null;
  decidedBy: string;
  decidedAt: string;
}

export interface SettleDisagreement extends Disagreement {
  decision: DecisionView | null;
}

type ReadBrief = { id: number; readerId: number; readerName: string };

export interface SettleState {
  collectionId: number;
  /** 'not-ready': nothing to settle yet (see `reason`); 'open': decisions wanted; 'settled': the settled read is written. */
  status: 'not-ready' | 'open' | 'settled';
  reason: string | null;
  first: ReadBrief | null;
  second: ReadBrief | null;
  settled: ReadBrief | null;
  /** The first read's class set (the settled read's too). */
  classSet: ClassSet | null;
  images: FieldImageRef[];
  /** Every mark of the two reads (the view shows each read's cells around a disagreement). */
  marks: { first: ScoringMark[]; second: ScoringMark[] };
  /** Walk order: image by image, top to bottom (lib/agreement). Empty unless both reads are submitted. */
  disagreements: SettleDisagreement[];
  progress: SettleProgress;
  /** Whether the asking user may decide now, and if not why (null when they may or nothing is to be decided). */
  mayDecide: boolean;
  whyNot: string | null;
}

const brief = (r: ReportReadRow | null): ReadBrief | null => (r ? { id: r.id, readerId: r.readerId, readerName: r.readerName } : null);

async function decisionRows(k: K, firstId: number, secondId: number): Promise<(SettleDecision & DecisionView)[]> {
  const rows: Row[] = await k('settle_decisions as d')
    .join('users as u', 'u.id', 'd.decided_by')
    .where({ 'd.first_read_id': firstId, 'd.second_read_id': secondId })
    .orderBy('d.id')
    .select('d.disagreement_key', 'd.decision', 'd.class_key', 'd.decided_at', 'u.name');
  return rows.map((r) => ({ key: r.disagreement_key, decision: r.decision, classKey: r.class_key, decidedBy: r.name, decidedAt: new Date(r.decided_at).toISOString() }));
}

async function imagesOf(k: K, collectionId: number): Promise<FieldImageRef[]> {
  const rows: Row[] = await k('field_images').where({ collection_id: collectionId }).orderBy('position').orderBy('id');
  return rows.map((i) => ({
    id: String(i.id),
    fileName: i.file_name,
    width: i.width,
    height: i.height,
    micronsPerPixel: i.microns_per_pixel == null ? null : Number(i.microns_per_pixel),
    position: i.position,
    displayUrl: `/api/images/${i.id}/display`,
    thumbUrl: `/api/images/${i.id}/thumb`,
  }));
}

/** The collection's settle state as `actor` sees it. 404 when the collection does not exist. */
export async function settleStateOf(k: K, actor: SettleActor, collectionId: number, settings: Pick<LabSettings, 'secondReadRequired'> & PairingSettings): Promise<SettleState> {
  const exists = await k('collections').where({ id: collectionId }).first('id');
  if (!exists) throw new ApiError(404, 'not_found', 'The collection was not found.');
  const r = await readsForReport(k, collectionId, settings);
  const { first, second, settled } = settleReads(r.reads);
  const refusal = whySettleRefused(actor, r.reads, { secondReader: second?.readerName });
  const base = { collectionId, first: brief(first), second: brief(second), settled: brief(settled), classSet: first?.classSet ?? null };
  if (!first || !second || !r.agreement || openReadOf(r.reads)) {
    return {
      ...base,
      status: 'not-ready',
      reason: refusal?.message ?? 'Both the first and the second read must be submitted before their disagreements can be settled.',
      images: [],
      marks: { first: [], second: [] },
      disagreements: [],
      progress: { total: 0, decided: 0, undecided: [] },
      mayDecide: false,
      whyNot: refusal?.message ?? null,
    };
  }
  const [rows, images] = await Promise.all([decisionRows(k, first.id, second.id), imagesOf(k, collectionId)]);
  const inForce = decisionsInForce(rows);
  const disagreements = r.agreement.disagreements.map((d) => {
    const x = inForce.get(d.key);
    return { ...d, decision: x ? { decision: x.decision, classKey: x.classKey, decidedBy: x.decidedBy, decidedAt: x.decidedAt } : null };
  });
  const progress = settleProgress(disagreements, inForce);
  const status = settled ? 'settled' : 'open';
  const reason = disagreements.length === 0 && !settled ? 'The two reads agree cell for cell: there is nothing to settle, and the first read stands as the settled result.' : null;
  const asMark = (m: ReportPairingMark): ScoringMark => ({ id: m.id, imageId: m.imageId, x: m.x, y: m.y, classKey: m.classKey, tags: m.tags });
  const marks = {
    first: r.pairings.flatMap(({ pairing }) => [...pairing.pairs.map((p) => p.first), ...pairing.onlyFirst]).map(asMark),
    second: r.pairings.flatMap(({ pairing }) => [...pairing.pairs.map((p) => p.second), ...pairing.onlySecond]).map(asMark),
  };
  return { ...base, status, reason, images, marks, disagreements, progress, mayDecide: !refusal && disagreements.length > 0, whyNot: refusal?.message ?? null };
}

export interface DecisionInput {
  /** Client-made UUID of this save. */
  opId: string;
  /** The disagreement's key. */
  key: string;
  decision: SettleDecisionKind;
  classKey?: string | null;
}

export interface DecisionsResult extends Required<SendResult<never>> {
  progress: SettleProgress;
  /** The settled read, once written (by this request or an earlier one). */
  settledReadId: number | null;
}

/**
 * Stores decisions and, when every disagreement has one, writes the settled read, in the
 * caller's transaction. Each decision is applied once by its opId (a repeat is acknowledged, not
 * stored again); a decision for a key that is no disagreement of these reads, or that does not
 * fit it, is rejected with its reason and changes nothing. Throws 403 / 409 (whySettleRefused)
 * before anything is written.
 *
 * Concurrency: every settling transaction of a collection first locks the collection's reads
 * (FOR UPDATE), so two requests never both write the settled read or miss each other's decisions.
 */
export async function applyDecisionsTx(
  trx: Knex.Transaction,
  actor: SettleActor,
  collectionId: number,
  inputs: readonly DecisionInput[],
  settings: Pick<LabSettings, 'secondReadRequired'> & PairingSettings,
  /** When the decisions are taken (the demo seed dates its own); now by default. */
  at?: Date,
): Promise<DecisionsResult> {
  const locked = await trx('reads').where({ collection_id: collectionId }).forUpdate().select('id');
  if (!locked.length && !(await trx('collections').where({ id: collectionId }).first('id'))) throw new ApiError(404, 'not_found', 'The collection was not found.');
  const r = await readsForReport(trx, collectionId, settings);
  const { first, second } = settleReads(r.reads);
  const applied = await trx('settle_decisions').whereIn('op_id', inputs.map((i) => i.opId)).forShare().select('op_id', 'disagreement_key');
  const seen = new Map<string, string>(applied.map((a: Row) => [a.op_id, a.disagreement_key]));
  const result: DecisionsResult = { acked: [], conflicts: [], rejected: [], progress: { total: 0, decided: 0, undecided: [] }, settledReadId: null };
  // Repeats of stored decisions are acknowledged even once the collection is settled: the browser
  // that sent them must hear they are stored.
  const fresh = inputs.filter((i) => {
    if (!seen.has(i.opId)) return true;
    result.acked.push({ opId: i.opId, markId: i.key });
    return false;
  });

  const refusal = whySettleRefused(actor, r.reads, { secondReader: second?.readerName });
  if (refusal && (fresh.length > 0 || !first || !second)) throw new ApiError(refusal.status, refusal.status === 403 ? 'forbidden' : 'conflict', refusal.message);
  if (!first || !second || !r.agreement) return result;

  const byKey = new Map(r.agreement.disagreements.map((d) => [d.key, d]));
  const classes = first.classSet.classes.map((c) => ({ key: c.key, countsAsSperm: c.countsAsSperm }));
  const rows: Row[] = [];
  for (const i of fresh) {
    if (seen.has(i.opId)) {
      // The same op twice in one batch: the first one counts.
      result.acked.push({ opId: i.opId, markId: i.key });
      continue;
    }
    const problem = !byKey.has(i.key)
      ? 'This disagreement is not one between the collection’s submitted first and second reads (reload the settle view).'
      : whyNotDecision({ decision: i.decision, classKey: i.classKey ?? null }, classes);
    if (problem) {
      result.rejected.push({ opId: i.opId, markId: i.key, message: problem });
      continue;
    }
    seen.set(i.opId, i.key);
    rows.push({
      op_id: i.opId, collection_id: collectionId, first_read_id: first.id, second_read_id: second.id,
      disagreement_key: i.key, decision: i.decision, class_key: i.decision === 'other' ? i.classKey : null, decided_by: actor.id, decided_at: at ?? trx.fn.now(3),
    });
    result.acked.push({ opId: i.opId, markId: i.key });
  }
  if (rows.length) {
    await trx('settle_decisions').insert(rows);
    for (const row of rows) {
      const d = byKey.get(row.disagreement_key)!;
      await audit(trx, {
        userId: actor.id, action: 'settle_decision', entity: 'collection', entityId: collectionId,
        after: { key: row.disagreement_key, kind: d.kind, first: d.first?.classKey ?? null, second: d.second?.classKey ?? null, decision: row.decision, classKey: row.class_key, opId: row.op_id, firstReadId: first.id, secondReadId: second.id },
      });
    }
  }

  const inForce = decisionsInForce(
    (await decisionRows(trx, first.id, second.id)).map((d): SettleDecision => ({ key: d.key, decision: d.decision, classKey: d.classKey })),
  );
  result.progress = settleProgress(r.agreement.disagreements, inForce);
  const done = settleReads(r.reads).settled;
  if (done) result.settledReadId = done.id;
  else if (result.progress.undecided.length === 0 && r.agreement.disagreements.length > 0) {
    result.settledReadId = await writeSettledRead(trx, actor, collectionId, first, second, r.pairings, inForce, classes, at);
  }
  return result;
}

async function writeSettledRead(
  trx: Knex.Transaction,
  actor: SettleActor,
  collectionId: number,
  first: ReportReadRow,
  second: ReportReadRow,
  pairings: Parameters<typeof buildSettledRead>[0],
  decisions: Map<string, SettleDecision>,
  classes: { key: string; countsAsSperm: boolean }[],
  at: Date | undefined,
): Promise<number> {
  const built = buildSettledRead(pairings, decisions, classes);
  if (built.undecided.length) throw new ApiError(409, 'conflict', 'Some disagreements are not decided yet.');
  const source: Row = await trx('reads').where({ id: first.id }).first('class_set_id', 'class_set_snapshot', 'target_cells');
  const [readId] = await trx('reads').insert({
    collection_id: collectionId, kind: SETTLED_READ, reader_id: actor.id, class_set_id: source.class_set_id,
    class_set_snapshot: typeof source.class_set_snapshot === 'string' ? source.class_set_snapshot : JSON.stringify(source.class_set_snapshot),
    target_cells: source.target_cells, status: SUBMITTED, started_at: at ?? trx.fn.now(3), submitted_at: at ?? trx.fn.now(3),
  });
  const marks = built.marks.map((m) => ({
    id: crypto.randomUUID(), read_id: readId, image_id: Number(m.imageId), x: m.x, y: m.y, class_key: m.classKey, tags: JSON.stringify(m.tags),
    version: 1, deleted: false, last_op_id: crypto.randomUUID(), updated_by: actor.id,
  }));
  for (let i = 0; i < marks.length; i += 500) await trx('marks').insert(marks.slice(i, i + 500));
  await audit(trx, {
    userId: actor.id, action: 'settle', entity: 'read', entityId: readId,
    after: { kind: SETTLED_READ, collectionId, firstReadId: first.id, secondReadId: second.id, marks: marks.length, decisions: decisions.size },
  });
  return readId;
}
