import Link from 'next/link';
import type { ReadMorphology } from '@/db/queries/morphology';
import { fmt } from '@/lib/format';
import { OPEN, READ_KIND_LABELS, READ_STATUS_LABELS, SUBMITTED, readLabel } from '@/lib/reads/kinds';

/** Per-read figures of a collection, straight from the morphology engine (server component). */
export function MorphologySummary({ reads }: { reads: ReadMorphology[] }) {
  if (reads.length === 0) return <p className="text-sm text-ink-soft">No read has been started on this collection.</p>;
  return (
    <div className="grid gap-4 lg:grid-cols-2">
      {reads.map((r) => {
        const m = r.morphology;
        const label = readLabel(r);
        const region = `${READ_KIND_LABELS[r.kind]} by ${r.readerName} (read ${r.number})`;
        const defects = new Map(m.defectFrequency.perClass.map((d) => [d.classId, d]));
        const tagged = m.defectFrequency.totalDefects > m.abnormalCount;
        return (
          <section key={r.readId} aria-label={region} className="card space-y-2">
            <p className="flex flex-wrap items-baseline justify-between gap-2">
              <span className="font-medium">{label} · {r.readerName}</span>
              <span className={`text-sm ${r.status === SUBMITTED ? 'text-ok' : 'text-warn'}`}>{READ_STATUS_LABELS[r.status]}</span>
            </p>
            <p className="text-sm" data-testid="read-headline">
              <strong>{fmt(m.pctNormal)} % normal</strong>
              {m.normalIntervalPct && (
                <span className="text-ink-soft"> (95 % interval {fmt(m.normalIntervalPct.lower)}–{fmt(m.normalIntervalPct.upper)} %, Wilson)</span>
              )}{' '}
              · {m.cellsCounted} of {m.target} cells
              {m.targetReached ? ' — target reached' : ''}
              {m.nonSpermCounted > 0 && ` · ${m.nonSpermCounted} non-sperm cells tallied apart`}
            </p>
            <table aria-label={`${READ_KIND_LABELS[r.kind]} counts per class`}>
              <thead>
                <tr>
                  <th className="th">Class</th>
                  <th className="th">Cells</th>
                  <th className="th">% of sperm</th>
                  <th className="th" title="Cells carrying the defect as their class or as an extra tag">With the defect (%)</th>
                </tr>
              </thead>
              <tbody>
                {m.cells.perClass
                  .filter((c) => c.count > 0 || (defects.get(c.classId)?.cellsWithDefect ?? 0) > 0)
                  .map((c) => {
                    const d = defects.get(c.classId);
                    return (
                      <tr key={c.classId}>
                        <td className="td">{c.name}</td>
                        <td className="td">{c.count}</td>
                        <td className="td">{c.pctOfCells == null ? 'apart' : fmt(c.pctOfCells)}</td>
                        <td className="td">{d ? `${d.cellsWithDefect} (${fmt(d.pctOfCells)})` : '—'}</td>
                      </tr>
                    );
                  })}
              </tbody>
            </table>
            <p className="text-xs text-ink-faint">
              “Cells” and “% of sperm” count each cell once, by its class (they add up to 100 %). “With the defect” also counts extra defect tags
              {tagged ? `: ${m.defectFrequency.totalDefects} defects on ${m.cellsCounted} cells, a defect frequency of ${fmt(m.defectFrequency.sumPct)} %` : ''}, so it may add up to more than 100 %.
            </p>
            <Link href={`/reads/${r.readId}`} className="text-sm">{r.status === OPEN ? 'Open the read' : 'View the read'}</Link>
          </section>
        );
      })}
    </div>
  );
}
