'use client';

import Link from 'next/link';
import { useEffect } from 'react';

/**
 * What a person sees when a page fails: a calm sentence, a retry, where to go instead, and the
 * error's reference (the digest, which the server log also carries). Never the error's message or
 * stack: a server error's details stay in the log.
 */
export function ErrorPanel({ error, retry, home = '/' }: { error: Error & { digest?: string }; retry: () => void; home?: string }) {
  useEffect(() => {
    // The browser console only; the server logged the full error under the same digest.
    console.error('[fieldmark] page error', error.digest ?? '');
  }, [error]);
  return (
    <section aria-labelledby="error-heading" className="card mx-auto max-w-xl space-y-3">
      <h1 id="error-heading">This page could not be shown</h1>
      <p className="text-sm">
        Something went wrong while preparing it. Nothing you saved is lost: marks and records are stored as you make them. Try again; if it keeps
        happening, tell the lab manager and give them the reference below.
      </p>
      <div className="flex flex-wrap gap-2">
        <button type="button" className="btn" onClick={() => retry()}>
          Try again
        </button>
        <Link href={home} className="btn-secondary no-underline hover:no-underline">
          Go to the start page
        </Link>
      </div>
      <p className="text-xs text-ink-faint" data-testid="error-reference">
        Reference: {error.digest ?? 'none (the error happened in this browser)'}
      </p>
    </section>
  );
}
