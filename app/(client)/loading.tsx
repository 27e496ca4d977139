import { LoadingPanel } from '@/components/feedback/loading-panel';

export default function ClientLoading() {
  return <LoadingPanel />;
}
