import type { Metadata } from 'next';
import { redirect } from 'next/navigation';
import { safeCallbackUrl } from '@/lib/auth/callback-url';
import { getCurrentUser } from '@/lib/auth/session';
import { env } from '@/lib/env';
import { SignInForm } from './_components/sign-in-form';

export const metadata: Metadata = { title: 'Sign in' };

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ callbackUrl?: string }> }) {
  if (await getCurrentUser()) redirect('/');
  const { callbackUrl } = await searchParams;
  // Only addresses on the app's own origin are followed; anything else lands on the role's home page ('/').
  const next = safeCallbackUrl(callbackUrl, env().APP_URL) ?? '/';
  return (
    <main className="flex min-h-screen items-center justify-center p-4">
      <div className="w-full max-w-sm">
        <p className="mb-1 text-sm font-semibold uppercase tracking-widest text-brand">Fieldmark</p>
        <h1 className="mb-6">Sign in to the lab workbench</h1>
        <SignInForm next={next} />
        <p className="mt-6 text-xs text-ink-faint">
          Accounts are made by your lab manager. Forgotten your password? Your lab manager can send you a link to set a new one.
        </p>
      </div>
    </main>
  );
}
