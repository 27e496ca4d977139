import { connection } from 'next/server';
import { NotFoundPanel } from '@/components/feedback/not-found-panel';

export const metadata = { title: 'Not found' };

export default async function RootNotFound() {
  // Rendered per request, so its scripts carry the page's CSP nonce like every other page.
  await connection();
  return (
    <main className="px-4 py-10">
      <NotFoundPanel />
    </main>
  );
}
