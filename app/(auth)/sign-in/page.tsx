import type { Metadata } from 'next';
import { redirect } from 'next/navigation';
import { getCurrentUser } from '@/lib/auth/session';
import { SignInForm } from './_components/sign-in-form';

export const metadata: Metadata = { title: 'Sign in' };

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ callbackUrl?: string }> }) {
  if (await getCurrentUser()) redirect('/');
  const { callbackUrl } = await searchParams;
  // Only same-site paths are followed after sign-in.
  const next = callbackUrl && callbackUrl.startsWith('/') && !callbackUrl.startsWith('//') ? callbackUrl : '/';
  return (
    <main className="flex min-h-screen items-center justify-center p-4">
      <div className="w-full max-w-sm">
        <p className="mb-1 text-sm font-semibold uppercase tracking-widest text-brand">Fieldmark</p>
        <h1 className="mb-6">Sign in to the lab workbench</h1>
        <SignInForm next={next} />
        <p className="mt-6 text-xs text-ink-faint">
          Accounts are made by your lab manager. Forgotten password: ask them for a new invitation.
        </p>
      </div>
    </main>
  );
}
