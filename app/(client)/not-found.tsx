import { NotFoundPanel } from '@/components/feedback/not-found-panel';

export default function ClientNotFound() {
  return <NotFoundPanel home="/portal" homeLabel="Go to my stallions" />;
}
