'use client';

import { memo } from 'react';
import type { MarkClass } from '@/lib/class-sets/schema';
import type { ImageTally, Morphology } from '@/lib/morphology/engine';
import { MarkerSwatch } from './marker-swatch';
import { formatPct } from '@/lib/format';

/** Running counts for the image on screen and the whole read, with % normal and progress to the target. */
export const TallyPanel = memo(function TallyPanel({
  classes,
  read,
  image,
  imageLabel,
}: {
  classes: readonly MarkClass[];
  read: Morphology;
  image: ImageTally | undefined;
  imageLabel: string;
}) {
  const pct = read.targetProgressPct;
  const ci = read.normalIntervalPct;
  const sperm = classes.filter((c) => c.countsAsSperm);
  const other = classes.filter((c) => !c.countsAsSperm);
  const readCount = (key: string) => read.cells.perClass.find((p) => p.classId === key);
  return (
    <section aria-labelledby="tally-heading" className="space-y-2">
      <h2 id="tally-heading" className="text-sm font-semibold">
        Tally
      </h2>
      <div>
        <div className="flex items-baseline justify-between text-sm">
          <span id="progress-label" className="font-medium">
            {read.cellsCounted} of {read.target} cells
          </span>
          <span className="text-ink-faint">{read.targetReached ? 'target reached' : `${read.remainingToTarget} to go`}</span>
        </div>
        <div
          role="progressbar"
          aria-label="Cells counted"
          aria-valuemin={0}
          aria-valuemax={read.target}
          aria-valuenow={read.cellsCounted}
          aria-valuetext={`${read.cellsCounted} of ${read.target} cells`}
          className="mt-1 h-2 w-full overflow-hidden rounded-full bg-paper-sunk"
        >
          <div className={`h-full ${read.targetReached ? 'bg-ok' : 'bg-brand'}`} style={{ width: `${pct}%` }} />
        </div>
      </div>
      <p className="text-sm" data-testid="pct-normal">
        <span className="font-semibold">{formatPct(read.pctNormal)} normal</span>
        {ci && (
          <span className="text-ink-soft">
            {' '}
            (95 % CI {ci.lower.toFixed(1)}–{ci.upper.toFixed(1)} %, Wilson)
          </span>
        )}
      </p>
      <table aria-label="Tally by class" className="text-xs">
        <thead>
          <tr>
            <th scope="col" className="py-1 text-left font-medium text-ink-soft">
              Class
            </th>
            <th scope="col" className="py-1 pl-2 text-right font-medium text-ink-soft" title={imageLabel}>
              This image
            </th>
            <th scope="col" className="py-1 pl-2 text-right font-medium text-ink-soft">
              Read
            </th>
            <th scope="col" className="py-1 pl-2 text-right font-medium text-ink-soft">
              % of cells
            </th>
          </tr>
        </thead>
        <tbody>
          {sperm.map((c) => (
            <tr key={c.key} className="border-t border-line">
              <th scope="row" className="py-1 text-left font-normal">
                <span className="flex items-center gap-1.5">
                  <span className="rounded bg-[#2a2630] p-px">
                    <MarkerSwatch shape={c.shape} colour={c.colour} size={14} />
                  </span>
                  {c.name}
                </span>
              </th>
              <td className="whitespace-nowrap py-1 pl-2 text-right tabular-nums">{image?.byClass[c.key] ?? 0}</td>
              <td className="whitespace-nowrap py-1 pl-2 text-right tabular-nums">{readCount(c.key)?.count ?? 0}</td>
              <td className="whitespace-nowrap py-1 pl-2 text-right tabular-nums">{formatPct(readCount(c.key)?.pctOfCells ?? null)}</td>
            </tr>
          ))}
          <tr className="border-t-2 border-line font-medium">
            <th scope="row" className="py-1 text-left">
              Sperm cells
            </th>
            <td className="whitespace-nowrap py-1 pl-2 text-right tabular-nums">{image?.cellsCounted ?? 0}</td>
            <td className="whitespace-nowrap py-1 pl-2 text-right tabular-nums">{read.cellsCounted}</td>
            <td className="whitespace-nowrap py-1 pl-2 text-right tabular-nums">{read.cellsCounted > 0 ? '100.0 %' : '—'}</td>
          </tr>
          {other.map((c) => (
            <tr key={c.key} className="border-t border-line text-ink-soft">
              <th scope="row" className="py-1 text-left font-normal">
                <span className="flex items-center gap-1.5">
                  <span className="rounded bg-[#2a2630] p-px">
                    <MarkerSwatch shape={c.shape} colour={c.colour} size={14} />
                  </span>
                  {c.name} <span className="text-ink-faint">(not sperm)</span>
                </span>
              </th>
              <td className="whitespace-nowrap py-1 pl-2 text-right tabular-nums">{image?.byClass[c.key] ?? 0}</td>
              <td className="whitespace-nowrap py-1 pl-2 text-right tabular-nums">{readCount(c.key)?.count ?? 0}</td>
              <td className="py-1 text-right">—</td>
            </tr>
          ))}
        </tbody>
      </table>
      {read.defectFrequency.totalDefects > read.abnormalCount && (
        <p className="text-xs text-ink-faint">
          With extra defect tags: {read.defectFrequency.totalDefects} defects on {read.cellsCounted} cells (defect frequency {formatPct(read.defectFrequency.sumPct)} of cells; may exceed 100 %).
        </p>
      )}
    </section>
  );
});
