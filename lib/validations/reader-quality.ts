import { z } from 'zod';

const day = (what: string) => z.iso.date({ message: `Enter the ${what} date as YYYY-MM-DD.` });

/** The period of the reader-quality page and GET /api/reader-quality: collections collected from `from` to `to`, the lab's days. */
export const readerQualityQuery = z
  .object({ from: day('first').optional(), to: day('last').optional() })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { path: ['to'], message: 'The last date must not come before the first.' });
export type ReaderQualityQuery = z.infer<typeof readerQualityQuery>;

/** The period asked for, or the twelve months up to `today` (a YYYY-MM-DD on the lab's calendar). */
export function qualityPeriod(q: ReaderQualityQuery, today: string): { from: string; to: string } {
  const to = q.to ?? today;
  if (q.from) return { from: q.from, to };
  const [y, m, d] = to.split('-').map(Number) as [number, number, number];
  const from = new Date(Date.UTC(y - 1, m - 1, d + 1)).toISOString().slice(0, 10);
  return { from, to };
}
