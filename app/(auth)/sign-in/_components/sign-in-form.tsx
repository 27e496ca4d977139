'use client';

import { signIn } from 'next-auth/react';
import { useState } from 'react';

function messageFor(error: string): string {
  if (error.startsWith('rate_limited:')) {
    const minutes = Math.max(1, Math.ceil(Number(error.split(':')[1]) / 60));
    return `Too many failed attempts. Wait ${minutes} minute${minutes === 1 ? '' : 's'} and try again.`;
  }
  if (error === 'CredentialsSignin') return 'The e-mail or password is wrong, or the account is not active.';
  return 'Sign-in failed. Try again in a moment.';
}

export function SignInForm({ next }: { next: string }) {
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    const email = String(form.get('email') ?? '').trim();
    const password = String(form.get('password') ?? '');
    if (!email || !password) {
      setError('Enter your e-mail and password.');
      return;
    }
    setBusy(true);
    setError(null);
    const res = await signIn('credentials', { email, password, redirect: false });
    if (!res || res.error) {
      setError(messageFor(res?.error ?? ''));
      setBusy(false);
      return;
    }
    window.location.assign(next);
  }

  return (
    <form onSubmit={onSubmit} className="card space-y-4" noValidate aria-describedby={error ? 'sign-in-error' : undefined}>
      <div>
        <label htmlFor="email" className="label">E-mail</label>
        <input id="email" name="email" type="email" autoComplete="username" required className="input" />
      </div>
      <div>
        <label htmlFor="password" className="label">Password</label>
        <input id="password" name="password" type="password" autoComplete="current-password" required className="input" />
      </div>
      {error && (
        <p id="sign-in-error" role="alert" className="rounded-md bg-danger-bg px-3 py-2 text-sm text-danger">
          {error}
        </p>
      )}
      <button type="submit" className="btn w-full" disabled={busy}>
        {busy ? 'Signing in…' : 'Sign in'}
      </button>
    </form>
  );
}
