import { z } from 'zod';
import { parseVerificationCode } from '@/lib/reports/verification';

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
