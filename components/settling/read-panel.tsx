import type { ReactNode } from 'react';
import type { DisagreementMark } from '@/lib/agreement/agreement';
import type { MarkClass } from '@/lib/class-sets/schema';
import { MarkerSwatch } from '@/components/scoring/marker-swatch';

/** One reader's side of a disagreement: who, the class they gave (or that they marked nothing), and their canvas. */
export function ReadPanel({ side, readerName, mark, markClass, children }: { side: 'first' | 'second'; readerName: string; mark: DisagreementMark | null; markClass: MarkClass | undefined; children: ReactNode }) {
  const title = side === 'first' ? 'First read' : 'Second read';
  return (
    <section aria-label={`${title} by ${readerName}`} className="space-y-1">
      <div>
        <h3 className="text-sm font-semibold">
          {title} <span className="font-normal text-ink-soft">· {readerName}</span>
        </h3>
        <p className="flex items-center gap-1.5 text-sm" data-testid={`${side}-class`}>
          {mark ? (
            <>
              {markClass && (
                <span className="rounded bg-[#2a2630] p-0.5">
                  <MarkerSwatch shape={markClass.shape} colour={markClass.colour} />
                </span>
              )}
              <strong>{markClass?.name ?? mark.classKey}</strong>
            </>
          ) : (
            <em className="text-ink-soft">no mark here</em>
          )}
        </p>
      </div>
      <div className="h-[42vh] min-h-[260px] overflow-hidden rounded-lg border border-line">{children}</div>
    </section>
  );
}
