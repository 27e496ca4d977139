'use client';

import { ErrorPanel } from '@/components/feedback/error-panel';

export default function RootError({ error, retry }: { error: Error & { digest?: string }; retry: () => void }) {
  return (
    <main className="px-4 py-10">
      <ErrorPanel error={error} retry={retry} />
    </main>
  );
}
