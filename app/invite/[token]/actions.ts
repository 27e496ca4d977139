'use server';

import { acceptInvitation } from '@/db/queries/users';
import { ApiError } from '@/lib/api/errors';
import { acceptInvitationSchema } from '@/lib/validations/auth';

export type AcceptState = { ok?: boolean; email?: string; message?: string; fieldErrors?: Record<string, string> };

export async function acceptInvitationAction(_prev: AcceptState, form: unknown): Promise<AcceptState> {
  // A hand-made call may send anything for the form: only a FormData is read as one, the rest goes to the schema as it is.
  const parsed = acceptInvitationSchema.safeParse(form instanceof FormData ? Object.fromEntries(form) : form);
  if (!parsed.success) {
    const fieldErrors: Record<string, string> = {};
    for (const i of parsed.error.issues) fieldErrors[i.path.join('.')] ??= i.message;
    return { fieldErrors, message: 'Check the highlighted fields.' };
  }
  try {
    const { email } = await acceptInvitation(parsed.data.token, parsed.data.password);
    return { ok: true, email };
  } catch (err) {
    if (err instanceof ApiError) return { message: err.message };
    console.error('[fieldmark] invitation', err);
    return { message: 'The password could not be saved. Try again.' };
  }
}
