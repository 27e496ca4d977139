/**
 * A season summary of a stallion's collections: how many, the mean / median / range of the main
 * figures, the best and worst collections by PMMN, and how collections inside health events'
 * windows compare with those outside on % normal. Pure; reads the history points.
 */
import type { HistoryPoint } from './series';

export interface FigureStats {
  /** Collections with the figure. */
  n: number;
  mean: number;
  /** Middle value; the mean of the two middle values for an even count. */
  median: number;
  min: number;
  max: number;
}

export const SUMMARY_FIGURES = ['percentNormal', 'pmmnBillion', 'totalSpermBillion', 'progressiveMotilityPct', 'volumeMl', 'concentrationMillionPerMl'] as const;
export type SummaryFigure = (typeof SUMMARY_FIGURES)[number];
export const SUMMARY_FIGURE_LABELS: Record<SummaryFigure, { label: string; unit: string }> = {
  percentNormal: { label: '% normal', unit: '%' },
  pmmnBillion: { label: 'PMMN', unit: '× 10⁹' },
  totalSpermBillion: { label: 'Total sperm', unit: '× 10⁹' },
  progressiveMotilityPct: { label: 'Progressive motility', unit: '%' },
  volumeMl: { label: 'Gel-free volume', unit: 'mL' },
  concentrationMillionPerMl: { label: 'Concentration', unit: '× 10⁶/mL' },
};

export interface CollectionRef {
  id: number;
  collectedAt: string;
  pmmnBillion: number;
  percentNormal: number | null;
}

export interface WindowSide {
  collections: number;
  /** Of those, with a submitted read. */
  withRead: number;
  /** Mean % normal of those with a read (each collection weighs the same); null when none. */
  meanPercentNormal: number | null;
}

export interface SeasonSummary {
  collections: number;
  withRead: number;
  figures: Record<SummaryFigure, FigureStats | null>;
  /** Highest and lowest PMMN (the earlier collection wins a tie); null when no collection has PMMN. */
  best: CollectionRef | null;
  worst: CollectionRef | null;
  insideWindows: WindowSide;
  outsideWindows: WindowSide;
}

/** Mean, median and range of the values, or null for none. */
export function figureStats(values: readonly number[]): FigureStats | null {
  if (values.length === 0) return null;
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  const median = sorted.length % 2 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2;
  return { n: sorted.length, mean: sorted.reduce((s, v) => s + v, 0) / sorted.length, median, min: sorted[0]!, max: sorted[sorted.length - 1]! };
}

function side(points: readonly HistoryPoint[]): WindowSide {
  const read = points.filter((p) => p.percentNormal != null);
  return { collections: points.length, withRead: read.length, meanPercentNormal: figureStats(read.map((p) => p.percentNormal!))?.mean ?? null };
}

export function seasonSummary(points: readonly HistoryPoint[]): SeasonSummary {
  const figures = Object.fromEntries(
    SUMMARY_FIGURES.map((f) => [f, figureStats(points.map((p) => p[f]).filter((v): v is number => v != null))]),
  ) as Record<SummaryFigure, FigureStats | null>;
  const withPmmn = points
    .filter((p) => p.pmmnBillion != null)
    .map((p) => ({ id: p.id, collectedAt: p.collectedAt, pmmnBillion: p.pmmnBillion!, percentNormal: p.percentNormal }))
    .sort((a, b) => a.collectedAt.localeCompare(b.collectedAt));
  let best: CollectionRef | null = null;
  let worst: CollectionRef | null = null;
  for (const p of withPmmn) {
    if (!best || p.pmmnBillion > best.pmmnBillion) best = p;
    if (!worst || p.pmmnBillion < worst.pmmnBillion) worst = p;
  }
  return {
    collections: points.length,
    withRead: points.filter((p) => p.percentNormal != null).length,
    figures,
    best,
    worst,
    insideWindows: side(points.filter((p) => p.windows.length > 0)),
    outsideWindows: side(points.filter((p) => p.windows.length === 0)),
  };
}
