import { LoadingPanel } from '@/components/feedback/loading-panel';

export default function ReadLoading() {
  return <LoadingPanel what="the read and its field images" />;
}
