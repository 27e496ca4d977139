import { findInvitation } from '@/db/queries/users';
import { SetPasswordForm } from './_components/set-password-form';

export const metadata = { title: 'Set your password' };

export default async function InvitePage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const invitation = /^[A-Za-z0-9_-]{20,100}$/.test(token) ? await findInvitation(token) : null;
  return (
    <main className="flex min-h-screen items-center justify-center p-4">
      <div className="w-full max-w-sm">
        <p className="mb-1 text-sm font-semibold uppercase tracking-widest text-brand">Fieldmark</p>
        {invitation?.purpose === 'password_reset' ? (
          <>
            <h1 className="mb-2">Set a new password</h1>
            <p className="mb-6 text-sm text-ink-soft">Choose a new password for {invitation.email}. Your old password stops working once this one is set.</p>
            <SetPasswordForm token={token} />
          </>
        ) : invitation ? (
          <>
            <h1 className="mb-2">Welcome, {invitation.name}</h1>
            <p className="mb-6 text-sm text-ink-soft">Choose a password for {invitation.email}.</p>
            <SetPasswordForm token={token} />
          </>
        ) : (
          <>
            <h1 className="mb-2">This link cannot be used</h1>
            <p className="text-sm text-ink-soft">It has expired, was already used, or a newer link was sent. Ask your lab manager for a new one.</p>
          </>
        )}
      </div>
    </main>
  );
}
