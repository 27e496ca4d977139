// The words a report uses for its figures: one place, so the PDF, the e-mail and the report page agree.
import type { DoseKind, KappaBand, ReportSnapshot, SpermGroup } from './snapshot';

export const REPORT_TITLE = 'Semen evaluation and morphology report';

export const GROUP_LABELS: Record<SpermGroup, string> = {
  normal: 'Normal',
  head: 'Head',
  midpiece: 'Midpiece',
  droplet: 'Cytoplasmic droplet',
  tail: 'Tail',
  other: 'Other',
};

export const KAPPA_BAND_LABELS: Record<KappaBand, string> = {
  poor: 'poor',
  slight: 'slight',
  fair: 'fair',
  moderate: 'moderate',
  substantial: 'substantial',
  almost_perfect: 'almost perfect',
};

export const DOSE_LABELS: Record<DoseKind, string> = { fresh: 'Fresh', cooled: 'Cooled-shipped', frozen: 'Frozen' };
export const BASIS_LABELS = { progressive: 'progressively motile sperm', total: 'total sperm' } as const;

export const CELLS_VIEW_LABEL = 'Cells normal / abnormal (each cell once, by its main class; sums to 100 %)';
export const DEFECT_FREQUENCY_LABEL = 'Defect frequencies (a cell may carry several; may exceed 100 %)';

/** Which read the morphology comes from, in words. */
export function sourceLine(s: Pick<ReportSnapshot, 'morphology' | 'settings'>): string {
  return s.morphology.source === 'settled'
    ? 'From the settled read: a first read and a blind second read, every disagreement settled.'
    : 'From a single read: this lab allows reports without a second read, and this collection had none.';
}

const versionOf = (r: ReportSnapshot['report']) => `Version ${r.version}`;

/** "Version 2 — supersedes version 1: reason …", or "Version 1". */
export function versionLine(r: ReportSnapshot['report']): string {
  return r.supersedes ? `${versionOf(r)} — supersedes version ${r.supersedes.version}: ${r.supersedes.reason}` : versionOf(r);
}

/** "Superseded by version 3: reason …", or null while current. */
export function supersededLine(r: ReportSnapshot['report']): string | null {
  return r.supersededBy ? `Superseded by version ${r.supersededBy.version}: ${r.supersededBy.reason}` : null;
}

export const BSE_STATUS_LABELS = {
  pass: 'reaches the threshold',
  fail: 'below the threshold',
  unknown: 'cannot be judged (PMMN unknown)',
} as const;
