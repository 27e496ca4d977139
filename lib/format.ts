// Display formatting with units; numbers are kept unrounded everywhere else.
export const fmt = (v: number | null | undefined, digits = 1) =>
  v == null || Number.isNaN(v) ? '—' : v.toLocaleString('en-GB', { minimumFractionDigits: digits, maximumFractionDigits: digits });

/** An instant on the lab's wall clock, with the zone's short name (e.g. "10 Jun 2026, 10:25 BST"). */
export const fmtDateTime = (iso: string | Date, timeZone = 'UTC') =>
  new Date(iso).toLocaleString('en-GB', { day: '2-digit', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', timeZone, timeZoneName: 'short' });

/** A calendar date ('YYYY-MM-DD', as is), or the lab's day of an instant. */
export const fmtDate = (iso: string, timeZone = 'UTC') =>
  iso.length === 10
    ? new Date(`${iso}T00:00:00Z`).toLocaleDateString('en-GB', { day: '2-digit', month: 'short', year: 'numeric', timeZone: 'UTC' })
    : new Date(iso).toLocaleDateString('en-GB', { day: '2-digit', month: 'short', year: 'numeric', timeZone });

/** 10^9 with two decimals, the unit written out. */
export const billions = (v: number | null | undefined) => (v == null ? '—' : `${fmt(v, 2)} × 10⁹`);

/** A percentage with a fixed number of decimals, or a dash when there is none (the scoring tally). */
export const formatPct = (v: number | null | undefined, digits = 1): string => (v === null || v === undefined ? '—' : `${v.toFixed(digits)} %`);

/** "1 image", "3 images": a count with its noun. */
export const countOf = (n: number, singular: string, plural = `${singular}s`) => `${n} ${n === 1 ? singular : plural}`;
