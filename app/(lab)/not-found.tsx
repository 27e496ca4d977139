import { NotFoundPanel } from '@/components/feedback/not-found-panel';

export default function LabNotFound() {
  return <NotFoundPanel home="/dashboard" homeLabel="Go to the dashboard" />;
}
