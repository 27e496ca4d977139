import { LoadingPanel } from '@/components/feedback/loading-panel';

export default function CollectionLoading() {
  return <LoadingPanel what="the collection" />;
}
