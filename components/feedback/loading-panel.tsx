/** Shown while a server page prepares its data: says so, without moving the layout much. */
export function LoadingPanel({ what = 'the page' }: { what?: string }) {
  return (
    <div role="status" aria-live="polite" className="space-y-3">
      <p className="text-sm text-ink-soft">Loading {what}…</p>
      <div aria-hidden className="h-6 w-1/3 animate-pulse rounded bg-paper-sunk" />
      <div aria-hidden className="h-32 animate-pulse rounded-lg bg-paper-sunk" />
    </div>
  );
}
