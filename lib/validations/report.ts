import { z } from 'zod';
import { parseVerificationCode } from '@/lib/reports/verification';
import { listQuery, optionalText, requiredText } from './fields';

// A code pasted with %20 for its spaces still reads; a stray % is just a wrong character, never a 500.
function safeDecode(value: string): string {
  try {
    return decodeURIComponent(value);
  } catch {
    return value;
  }
}

/**
 * `/verify/{code}` and any route that takes a verification code: accepts the code as people type
 * it (case, dashes, O for 0 …) and hands on the canonical form, or a 422 message that says what
 * to check.
 */
export const verificationCodeParams = z.object({
  code: z
    .string()
    .max(64, 'A verification code has 20 characters (five groups of four). Check the code on the report.')
    .transform((value, ctx) => {
      const parsed = parseVerificationCode(safeDecode(value));
      if (!parsed.ok) {
        ctx.addIssue({ code: 'custom', message: parsed.message });
        return z.NEVER;
      }
      return parsed.code;
    }),
});

const text = (label: string, max: number) => optionalText(label, max).optional().default(null);

/** POST /api/collections/{id}/report/sign: the veterinarian's password again, and the text to sign with (else the saved draft text). */
export const signReportSchema = z.object({
  password: z.string({ error: 'Enter your password to sign.' }).min(1, 'Enter your password to sign.').max(200, 'A password is at most 200 characters.'),
  remarks: optionalText('Remarks', 20_000).optional(),
  interpretation: optionalText('Interpretation', 20_000).optional(),
});
export type SignReportValues = z.infer<typeof signReportSchema>;

/** PUT /api/collections/{id}/report: the veterinarian's remarks and interpretation before signing. */
export const reportTextSchema = z.object({ remarks: text('Remarks', 20_000), interpretation: text('Interpretation', 20_000) });
export type ReportTextValues = z.infer<typeof reportTextSchema>;

/** POST /api/reports/{id}/amend. */
export const amendReportSchema = z.object({
  reason: requiredText('The reason for the amendment', 2000).refine((r) => r.length >= 5, 'Say in a few words why the report is amended.'),
});

/** POST /api/reports/{id}/send: the owner's address (unless left out) and others typed in. */
export const sendReportSchema = z
  .object({
    includeOwner: z.boolean().default(true),
    to: z.array(z.string().trim().pipe(z.email('Enter valid e-mail addresses, e.g. name@example.com.'))).max(10, 'Send to at most 10 addresses at once.').default([]),
    message: optionalText('Message', 2000).optional(),
  });
export type SendReportValues = z.infer<typeof sendReportSchema>;

export const REPORT_STATUSES = ['current', 'amended', 'superseded'] as const;
export type ReportStatus = (typeof REPORT_STATUSES)[number];

/** GET /api/reports: newest first by default, paged. */
export const reportListQuery = listQuery(['signedAt', 'collectedAt', 'stallion'] as const, 'signedAt', 'desc').extend({
  stallionId: z.coerce.number().int().positive().optional(),
  /** 'latest': each collection's newest version (current, or being amended); 'all' includes superseded ones. */
  status: z.enum([...REPORT_STATUSES, 'latest', 'all']).default('all'),
});
export type ReportListQuery = z.infer<typeof reportListQuery>;
