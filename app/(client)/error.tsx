'use client';

import { ErrorPanel } from '@/components/feedback/error-panel';

export default function ClientError({ error, retry }: { error: Error & { digest?: string }; retry: () => void }) {
  return <ErrorPanel error={error} retry={retry} home="/portal" />;
}
