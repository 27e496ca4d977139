/**
 * "Recount advised": the first and second reads' % normal differ by more than the acceptable
 * difference for duplicate counts. Plain text beside its sign, so it reads in a table cell and to a
 * screen reader alike.
 */
export function RecountFlag({ compact = false, detail }: { compact?: boolean; detail?: string }) {
  if (compact) {
    return (
      <span className="inline-flex items-center gap-1 whitespace-nowrap rounded bg-warn-bg px-1.5 text-xs font-medium text-warn" title="The two reads’ % normal differ by more than the acceptable difference">
        <span aria-hidden>↻</span> recount advised
      </span>
    );
  }
  return (
    <p role="note" className="rounded-md bg-warn-bg px-4 py-3 text-sm text-warn">
      <span className="font-medium"><span aria-hidden>↻ </span>Recount advised:</span> the two reads’ % normal differ by more than the acceptable difference for duplicate counts.
      {detail ? ` ${detail}` : ''} A further second read by a reader who read neither can be started.
    </p>
  );
}
