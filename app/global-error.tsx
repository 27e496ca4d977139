'use client';

import './globals.css';
import { ErrorPanel } from '@/components/feedback/error-panel';

/** When the root layout itself fails: this replaces it, so it brings its own html and body. */
export default function GlobalError({ error, retry }: { error: Error & { digest?: string }; retry: () => void }) {
  return (
    <html lang="en">
      <body className="min-h-screen font-sans">
        <main className="px-4 py-10">
          <ErrorPanel error={error} retry={retry} />
        </main>
      </body>
    </html>
  );
}
