'use client';

import { ErrorPanel } from '@/components/feedback/error-panel';

export default function LabError({ error, retry }: { error: Error & { digest?: string }; retry: () => void }) {
  return <ErrorPanel error={error} retry={retry} home="/dashboard" />;
}
