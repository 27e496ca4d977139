import 'server-only';
import { db } from '@/db/knex';
import { getLabSettings } from '@/db/queries/settings';
import type { CollectionAgreement } from '@/lib/agreement/agreement';
import type { CurrentUser } from '@/lib/auth/session';
import { reportAgreementOf } from '@/lib/reports/draft';
import type { Readiness } from '@/lib/reports/readiness';
import type { ReportAgreement } from '@/lib/reports/snapshot';
import {
  collectionReport,
  isBlindTo,
  readsForReport,
  type CollectionReportState,
  type ReadsForReport,
} from './report-core';

/*
 * Everything a report needs from the reads and the stallion's history, in one module: which read
 * the morphology comes from (and who read, checked, settled), the agreement figures, whether the
 * report can be signed, and the health events whose window covers the collection. The work is in
 * db/queries/report-core.ts (which the demo seed shares); these bind the app's pool and settings.
 */

/** The read the report's morphology comes from, its Morphology (the one engine), and who read, checked and settled. */
export async function reportMorphology(collectionId: number): Promise<Pick<ReadsForReport, 'basis' | 'morphology' | 'people'>> {
  const r = await readsForReport(db, collectionId, await getLabSettings());
  return { basis: r.basis, morphology: r.morphology, people: r.people };
}

/**
 * The agreement of the submitted first read and the submitted second read (lib/agreement), the
 * raw figures and the report's view of them; null unless both reads are submitted.
 */
export async function reportAgreement(collectionId: number): Promise<{ figures: CollectionAgreement; report: ReportAgreement | null } | null> {
  const r = await readsForReport(db, collectionId, await getLabSettings());
  return r.agreement ? { figures: r.agreement, report: reportAgreementOf(r.agreement) } : null;
}

/** Whether the collection's report can be signed now, and every reason why not (the 409 of sign-off). */
export async function readinessToSign(collectionId: number): Promise<Readiness> {
  return (await collectionReport(db, collectionId, { settings: await getLabSettings() })).readiness;
}

/** Health events whose spermatogenic window covers the collection, as the report lists them (staff only). */
export { healthEventsCoveringCollection } from './health-events';

/**
 * The collection's report as the actor may see it: the draft with its readiness. A reader whose
 * blind second read of this collection is open sees no read's figures here (as anywhere).
 */
export async function collectionReportFor(actor: CurrentUser, collectionId: number): Promise<CollectionReportState & { blind: boolean }> {
  const settings = await getLabSettings();
  const full = await collectionReport(db, collectionId, { settings });
  if (!isBlindTo(actor.id, full.reads)) return { ...full, blind: false };
  return { ...(await collectionReport(db, collectionId, { settings, blind: true })), blind: true };
}
