'use server';

import { acceptInvitation } from '@/db/queries/users';
import { ApiError } from '@/lib/api/errors';
import { acceptInvitationSchema } from '@/lib/validations/auth';

export type AcceptState = { ok?: boolean; email?: string; message?: string; fieldErrors?: Record<string, string> };

export async function acceptInvitationAction(_prev: AcceptState, form: FormData): Promise<AcceptState> {
  const parsed = acceptInvitationSchema.safeParse(Object.fromEntries(form));
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
