import Link from 'next/link';

/** A page or record that does not exist (or that this account may not open). */
export function NotFoundPanel({ home = '/', homeLabel = 'Go to the start page' }: { home?: string; homeLabel?: string }) {
  return (
    <section aria-labelledby="not-found-heading" className="card mx-auto max-w-xl space-y-3">
      <h1 id="not-found-heading">Not found</h1>
      <p className="text-sm">
        There is nothing at this address. The link may be mistyped, or the record it pointed to was never made. Check the address, or start
        again from the list you came from.
      </p>
      <Link href={home} className="btn-secondary no-underline hover:no-underline">
        {homeLabel}
      </Link>
    </section>
  );
}
