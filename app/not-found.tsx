import Link from 'next/link';
import { connection } from 'next/server';

export const metadata = { title: 'Not found' };

export default async function NotFound() {
  // Rendered per request, so its scripts carry the page's CSP nonce like every other page.
  await connection();
  return (
    <main className="flex min-h-screen items-center justify-center p-4">
      <div className="card max-w-md">
        <h1 className="mb-2">This page does not exist</h1>
        <p className="text-sm text-ink-soft">The address may be mistyped, or the record was removed.</p>
        <p className="mt-4">
          <Link href="/">Go to your start page</Link>
        </p>
      </div>
    </main>
  );
}
