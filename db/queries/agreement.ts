import 'server-only';
import { db } from '@/db/knex';
import { pairedReads, type PairedReads } from '@/db/queries/agreement-core';
import { getLabSettings } from '@/db/queries/settings';
import { ApiError, conflict, notFound } from '@/lib/api/errors';
import type { CollectionAgreement } from '@/lib/agreement/agreement';
import type { CurrentUser } from '@/lib/auth/session';
import { FIRST_READ, SECOND_READ, SETTLED_READ, SUBMITTED, numberReads, type ReadKind, type ReadStatus } from '@/lib/reads/kinds';
import { blindingRead, recountAdvised, visibleReads } from '@/lib/reads/policy';

/*
 * Agreement figures as a user may see them: the pairing of the latest submitted first and second
 * reads (db/queries/agreement-core.ts, shared with the report) over the reads the actor may see
 * (lib/reads/policy.ts visibleReads), for GET /api/collections/{id}/agreement, the collection page
 * and the "recount advised" flags of the lists.
 */

type ReadRefLite = { kind: ReadKind; status: ReadStatus };

/** The reads the actor may see, paired. */
function pairedFor(actor: CurrentUser, collectionId: number, settings: Awaited<ReturnType<typeof getLabSettings>>): Promise<PairedReads> {
  return pairedReads(db, collectionId, settings, { filter: (reads) => visibleReads(actor, reads) });
}

export interface AgreementView {
  firstRead: { readId: number; number: number; readerName: string };
  secondRead: { readId: number; number: number; readerName: string };
  /** The lab's pairing distance used, µm. */
  pairingDistanceUm: number;
  pairs: number;
  spermPairs: number;
  onlyFirst: number;
  onlySecond: number;
  classKeys: string[];
  confusion: CollectionAgreement['confusion'];
  observedAgreement: number | null;
  expectedAgreement: number | null;
  kappa: number | null;
  band: CollectionAgreement['band'];
  percentNormal: CollectionAgreement['percentNormal'];
  cellsCounted: CollectionAgreement['cellsCounted'];
  acceptableDifference: CollectionAgreement['acceptableDifference'];
  /** How many disagreements there are to settle (a class differs, or one reader alone marked a cell). */
  disagreements: number;
  perImage: CollectionAgreement['perImage'];
  /** % normal differs beyond the acceptable difference and no settled read has been written since. */
  recountAdvised: boolean;
}

/**
 * The agreement figures of a collection for the actor. 404 without the collection; 409 while the
 * actor's own second read is open (blind), and until a first and a second read are both submitted.
 */
export async function agreementFor(actor: CurrentUser, collectionId: number): Promise<AgreementView> {
  const [collection, settings] = await Promise.all([db('collections').where({ id: collectionId }).first('id'), getLabSettings()]);
  if (!collection) throw notFound('The collection');
  const paired = await pairedFor(actor, collectionId, settings);
  const all = await db('reads').where({ collection_id: collectionId }).orderBy('id').select('id', 'kind', 'status', 'reader_id');
  if (blindingRead(actor, all.map((r) => ({ id: r.id, kind: r.kind, status: r.status, readerId: r.reader_id })))) {
    throw conflict('Your second read of this collection is open and blind: the agreement figures appear once you submit it.');
  }
  const { first, second, agreement: a } = paired;
  if (!first || !second || !a) throw conflict('The agreement figures need a submitted first read and a submitted second read of this collection.');
  const numbers = numberReads(all);
  return {
    firstRead: { readId: first.id, number: numbers.get(first.id) ?? 1, readerName: first.readerName },
    secondRead: { readId: second.id, number: numbers.get(second.id) ?? 1, readerName: second.readerName },
    pairingDistanceUm: settings.pairingDistanceUm,
    pairs: a.pairs,
    spermPairs: a.spermPairs,
    onlyFirst: a.onlyFirst,
    onlySecond: a.onlySecond,
    classKeys: a.classKeys,
    confusion: a.confusion,
    observedAgreement: a.observedAgreement,
    expectedAgreement: a.expectedAgreement,
    kappa: a.kappa,
    band: a.band,
    percentNormal: a.percentNormal,
    cellsCounted: a.cellsCounted,
    acceptableDifference: a.acceptableDifference,
    disagreements: a.disagreements.length,
    perImage: a.perImage,
    recountAdvised: recountAdvised(paired.reads, a.acceptableDifference),
  };
}

/** agreementFor, or null where it would answer 409 (the collection page shows what there is). */
export async function agreementOrNull(actor: CurrentUser, collectionId: number): Promise<AgreementView | null> {
  try {
    return await agreementFor(actor, collectionId);
  } catch (err) {
    if (err instanceof ApiError && err.status === 409) return null;
    throw err;
  }
}

/**
 * Which of these collections carry "recount advised" for the actor, given the reads the actor
 * sees of each (as db/queries/morphology.ts returns them). Only collections with a submitted
 * first and second read and no settled read are paired, one at a time.
 */
export async function recountAdvisedAmong(actor: CurrentUser, readsByCollection: ReadonlyMap<number, readonly ReadRefLite[]>): Promise<Set<number>> {
  const candidates = [...readsByCollection].filter(([, reads]) => {
    const has = (kind: ReadKind) => reads.some((r) => r.kind === kind && r.status === SUBMITTED);
    return has(FIRST_READ) && has(SECOND_READ) && !reads.some((r) => r.kind === SETTLED_READ && r.status === SUBMITTED);
  });
  const out = new Set<number>();
  if (candidates.length === 0) return out;
  const settings = await getLabSettings();
  for (const [id] of candidates) {
    const paired = await pairedFor(actor, id, settings);
    if (recountAdvised(paired.reads, paired.agreement?.acceptableDifference)) out.add(id);
  }
  return out;
}
