import { LoadingPanel } from '@/components/feedback/loading-panel';

export default function LabLoading() {
  return <LoadingPanel />;
}
