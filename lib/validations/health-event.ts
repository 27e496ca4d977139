import { z } from 'zod';
import { HEALTH_EVENT_KINDS, HEALTH_EVENT_KIND_LABELS, takesTemperature } from '@/lib/health/kinds';
import { optionalNumber, optionalText } from './fields';

const date = (what: string) => z.iso.date(`Enter the ${what} as a date, e.g. 2026-05-04.`);
const optionalDate = (what: string) => z.preprocess((v) => (v === '' || v === undefined ? null : v), date(what).nullable());

/**
 * A health event as a form or the API sends it. Dates are the lab's calendar days. The end date
 * is the last day of the event (inclusive) and extends its window; a fever carries its peak
 * temperature, other kinds none (a stray figure would print on the report as if measured).
 */
export const healthEventSchema = z
  .object({
    kind: z.enum(HEALTH_EVENT_KINDS, `Choose the kind of event: ${Object.values(HEALTH_EVENT_KIND_LABELS).join(', ')}.`),
    startedOn: date('start date'),
    endedOn: optionalDate('end date').optional(),
    // 35–45 °C: a stallion's normal rectal temperature is about 37.5–38.5 °C (common practice); anything outside is a typing slip.
    peakTemperatureC: optionalNumber('Peak temperature', 35, 45, ' °C').optional(),
    notes: optionalText('Notes', 2000).optional(),
  })
  .superRefine((v, ctx) => {
    const today = new Date(Date.now() + 14 * 3600e3).toISOString().slice(0, 10); // the lab's today is at most 14 h ahead of UTC
    if (v.startedOn > today) ctx.addIssue({ code: 'custom', path: ['startedOn'], message: 'The start date cannot be in the future.' });
    if (v.startedOn < '1990-01-01') ctx.addIssue({ code: 'custom', path: ['startedOn'], message: 'The start date is too far in the past.' });
    if (v.endedOn != null && v.endedOn < v.startedOn) ctx.addIssue({ code: 'custom', path: ['endedOn'], message: 'The end date cannot be before the start date.' });
    if (v.endedOn != null && v.endedOn > today) ctx.addIssue({ code: 'custom', path: ['endedOn'], message: 'The end date cannot be in the future; leave it empty while the event goes on.' });
    if (v.peakTemperatureC != null && !takesTemperature(v.kind)) {
      ctx.addIssue({ code: 'custom', path: ['peakTemperatureC'], message: 'Only a fever has a peak temperature; clear it or choose Fever.' });
    }
  });

export type HealthEventInput = z.input<typeof healthEventSchema>;
export type HealthEventValues = z.output<typeof healthEventSchema>;

/** `from` / `to`: the lab's calendar days, both inclusive. */
export const historyQuery = z
  .object({
    from: date('start of the range').optional(),
    to: date('end of the range').optional(),
  })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { path: ['to'], message: 'The end of the range cannot be before its start.' });
export type HistoryQuery = z.infer<typeof historyQuery>;

/** The exports: a stallion's collections or the lab's, as CSV or .xlsx, over a range of the lab's days. */
export const exportQuery = z
  .object({
    format: z.enum(['csv', 'xlsx'], 'Choose the file format: csv or xlsx.').default('csv'),
    from: date('start of the range').optional(),
    to: date('end of the range').optional(),
    stallionId: z.coerce.number().int().positive().optional(),
  })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { path: ['to'], message: 'The end of the range cannot be before its start.' });
