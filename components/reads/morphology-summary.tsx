import Link from 'next/link';
import type { ReadTotals } from '@/db/queries/reads';
import { fmt } from '@/lib/format';

const KIND = { first: 'First read', second: 'Second read', settled: 'Settled read' } as const;

/** Per-read totals of a collection (server component). */
export function MorphologySummary({ reads }: { reads: ReadTotals[] }) {
  if (reads.length === 0) return <p className="text-sm text-ink-soft">No read has been started on this collection.</p>;
  return (
    <div className="grid gap-4 lg:grid-cols-2">
      {reads.map((r) => (
        <div key={r.readId} className="card space-y-2">
          <p className="flex flex-wrap items-baseline justify-between gap-2">
            <span className="font-medium">{KIND[r.kind]} · {r.readerName}</span>
            <span className={`text-sm ${r.status === 'submitted' ? 'text-ok' : 'text-warn'}`}>{r.status === 'submitted' ? 'Submitted' : 'In progress'}</span>
          </p>
          <p className="text-sm">
            <strong>{fmt(r.pctNormal)} % normal</strong>
            {r.wilson && <span className="text-ink-soft"> (95 % interval {fmt(r.wilson.lower)}–{fmt(r.wilson.upper)} %)</span>} · {r.cellsCounted} of {r.target} cells
            {r.targetReached ? ' — target reached' : ''}
            {r.nonSperm > 0 && ` · ${r.nonSperm} non-sperm cells tallied apart`}
          </p>
          <table aria-label={`${KIND[r.kind]} counts per class`}>
            <thead><tr><th className="th">Class</th><th className="th">Cells</th><th className="th">% of sperm</th></tr></thead>
            <tbody>
              {r.perClass.filter((c) => c.count > 0).map((c) => (
                <tr key={c.classKey}><td className="td">{c.name}</td><td className="td">{c.count}</td><td className="td">{c.pct == null ? 'apart' : fmt(c.pct)}</td></tr>
              ))}
            </tbody>
          </table>
          <Link href={`/reads/${r.readId}`} className="text-sm">{r.status === 'open' ? 'Open the read' : 'View the read'}</Link>
        </div>
      ))}
    </div>
  );
}
