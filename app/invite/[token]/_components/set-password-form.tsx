'use client';

import Link from 'next/link';
import { useActionState } from 'react';
import { acceptInvitationAction, type AcceptState } from '../actions';

export function SetPasswordForm({ token }: { token: string }) {
  const [state, action, pending] = useActionState<AcceptState, FormData>(acceptInvitationAction, {});
  if (state.ok) {
    return (
      <div className="card space-y-2" role="status">
        <p>Your password is set.</p>
        <Link href="/sign-in">Sign in as {state.email}</Link>
      </div>
    );
  }
  return (
    <form action={action} className="card space-y-4" noValidate>
      <input type="hidden" name="token" value={token} />
      <div>
        <label htmlFor="password" className="label">New password</label>
        <input id="password" name="password" type="password" autoComplete="new-password" className="input" aria-invalid={!!state.fieldErrors?.password} />
        <p className="mt-1 text-xs text-ink-faint">At least 10 characters.</p>
        {state.fieldErrors?.password && <p className="field-error">{state.fieldErrors.password}</p>}
      </div>
      <div>
        <label htmlFor="confirm" className="label">Repeat the password</label>
        <input id="confirm" name="confirm" type="password" autoComplete="new-password" className="input" aria-invalid={!!state.fieldErrors?.confirm} />
        {state.fieldErrors?.confirm && <p className="field-error">{state.fieldErrors.confirm}</p>}
      </div>
      {state.message && <p className="rounded-md bg-danger-bg px-3 py-2 text-sm text-danger">{state.message}</p>}
      <button className="btn w-full" disabled={pending}>{pending ? 'Saving…' : 'Set password'}</button>
    </form>
  );
}
