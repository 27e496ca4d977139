import Link from 'next/link';
import { navFor, ROLE_LABELS } from '@/lib/auth/roles';
import type { CurrentUser } from '@/lib/auth/session';
import { NavLinks } from './nav-links';
import { SignOutButton } from './sign-out-button';

export function AppShell({ user, children }: { user: CurrentUser; children: React.ReactNode }) {
  return (
    <div className="flex min-h-screen flex-col">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-paper-raised focus:px-3 focus:py-2">
        Skip to content
      </a>
      <header className="border-b border-line bg-paper-raised">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-2">
          <Link href="/" className="flex items-center gap-2 font-semibold text-ink no-underline hover:no-underline">
            <span aria-hidden className="inline-block h-3 w-3 rounded-full bg-brand ring-4 ring-brand-light" />
            Fieldmark
          </Link>
          <nav aria-label="Main" className="flex-1">
            <NavLinks items={navFor(user.role)} />
          </nav>
          <div className="flex items-center gap-3 text-sm">
            <span>
              <span className="font-medium">{user.name}</span>{' '}
              <span className="text-ink-faint">· {ROLE_LABELS[user.role]}</span>
            </span>
            <SignOutButton />
          </div>
        </div>
      </header>
      <main id="main" className="mx-auto w-full max-w-7xl flex-1 px-4 py-6">
        {children}
      </main>
      <footer className="border-t border-line px-4 py-3 text-center text-xs text-ink-faint">
        Figures support, and never replace, a veterinarian’s judgement; breeding and treatment decisions follow local
        regulations and licensed veterinary practice. <Link href="/help">Safety notes</Link>
      </footer>
    </div>
  );
}
