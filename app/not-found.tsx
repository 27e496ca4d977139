import { NotFoundPanel } from '@/components/feedback/not-found-panel';

export const metadata = { title: 'Not found' };

export default function RootNotFound() {
  return (
    <main className="px-4 py-10">
      <NotFoundPanel />
    </main>
  );
}
