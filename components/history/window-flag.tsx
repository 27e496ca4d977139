import type { CollectionFlag } from '@/lib/history/series';
import { fmtDate } from '@/lib/format';

/**
 * A collection inside health events' spermatogenic windows: each event with the day of its
 * window, and the date the merged stretch clears. Plain text, so it reads in a table cell, on the
 * collection page and to a screen reader alike.
 */
export function windowFlagText(flag: NonNullable<CollectionFlag>): string {
  const events = flag.events.map((e) => `${e.label} day ${e.windowDay} of ${e.windowDays}`).join('; ');
  return `${events} · clears ${fmtDate(flag.clearsDate)}`;
}

export function WindowFlag({ flag, compact = false }: { flag: CollectionFlag; compact?: boolean }) {
  if (!flag) return compact ? <span className="text-ink-faint">—</span> : null;
  if (compact) {
    return (
      <span className="inline-flex items-start gap-1 text-warn" title="Inside a health event’s spermatogenic window">
        <span aria-hidden>⚑</span>
        <span>{windowFlagText(flag)}</span>
      </span>
    );
  }
  return (
    <section aria-label="Health-event window" className="rounded-md bg-warn-bg px-4 py-3 text-sm text-warn">
      <p className="font-medium">
        <span aria-hidden>⚑ </span>Inside the spermatogenic window of {flag.events.length === 1 ? 'a health event' : `${flag.events.length} health events`}: the figures may not represent this stallion’s usual quality.
      </p>
      <ul className="mt-1 list-disc pl-5">
        {flag.events.map((e) => (
          <li key={e.eventId}>
            {e.label}: day {e.windowDay} of {e.windowDays} (its window clears {fmtDate(e.clearsDate)})
          </li>
        ))}
      </ul>
      <p className="mt-1">Re-evaluate from {fmtDate(flag.clearsDate)}.</p>
    </section>
  );
}
