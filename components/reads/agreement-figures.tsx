import type { AgreementView } from '@/db/queries/agreement';
import { fmt } from '@/lib/format';

const pct = (v: number | null) => (v == null ? '—' : `${fmt(v * 100)} %`);

/**
 * The agreement of a collection's first and second reads (server component): counts, the class ×
 * class table, observed agreement, Cohen's kappa and its band, both % normal and the acceptable
 * difference. `names` gives each class key its class name.
 */
export function AgreementFigures({ a, names }: { a: AgreementView; names: ReadonlyMap<string, string> }) {
  const name = (k: string) => names.get(k) ?? k;
  const d = a.acceptableDifference;
  return (
    <section aria-labelledby="agreement-heading" className="card space-y-3">
      <h3 id="agreement-heading">Agreement of the two reads</h3>
      <p className="text-sm text-ink-soft">
        Read {a.firstRead.number} (first, {a.firstRead.readerName}) against read {a.secondRead.number} (second, {a.secondRead.readerName}); marks paired one to one
        within {fmt(a.pairingDistanceUm)} µm on each image.
      </p>
      <dl className="grid grid-cols-2 gap-x-4 gap-y-1 text-sm sm:grid-cols-4">
        <dt className="text-ink-soft">Paired cells</dt><dd data-testid="agreement-pairs">{a.pairs}</dd>
        <dt className="text-ink-soft">Marked by the first reader only</dt><dd>{a.onlyFirst}</dd>
        <dt className="text-ink-soft">Marked by the second reader only</dt><dd>{a.onlySecond}</dd>
        <dt className="text-ink-soft">Disagreements to settle</dt><dd data-testid="agreement-disagreements">{a.disagreements}</dd>
        <dt className="text-ink-soft">Observed agreement (sperm pairs)</dt><dd>{pct(a.observedAgreement)}</dd>
        <dt className="text-ink-soft">Cohen’s kappa</dt>
        <dd data-testid="agreement-kappa">{a.kappa == null ? '—' : `${fmt(a.kappa, 2)} (${a.band}, Landis & Koch)`}</dd>
        <dt className="text-ink-soft">% normal, first · second</dt>
        <dd>{fmt(a.percentNormal.first)} % · {fmt(a.percentNormal.second)} %</dd>
        <dt className="text-ink-soft">Difference · acceptable limit</dt>
        <dd data-testid="agreement-difference" className={d?.differ ? 'font-medium text-warn' : ''}>
          {d ? `${fmt(d.difference)} · ${fmt(d.limit)} points${d.differ ? ' — beyond the limit' : ' — within the limit'}` : '—'}
        </dd>
      </dl>
      {a.classKeys.length > 0 && (
        <div className="overflow-x-auto">
          <table aria-label="Classes given by the two readers to paired cells">
            <caption className="mb-1 text-left text-xs text-ink-faint">Rows: first reader’s class; columns: second reader’s class; paired cells only.</caption>
            <thead>
              <tr>
                <th className="th" scope="col">First \ second</th>
                {a.classKeys.map((k) => <th key={k} className="th" scope="col">{name(k)}</th>)}
              </tr>
            </thead>
            <tbody>
              {a.classKeys.map((row) => (
                <tr key={row}>
                  <th className="td text-left font-medium" scope="row">{name(row)}</th>
                  {a.classKeys.map((col) => {
                    const n = a.confusion[row]?.[col] ?? 0;
                    return <td key={col} className={`td ${row === col ? 'font-medium' : n > 0 ? 'text-warn' : 'text-ink-faint'}`}>{n}</td>;
                  })}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <p className="text-xs text-ink-faint">
        Kappa and observed agreement count paired sperm cells only; the acceptable difference is the binomial rule for duplicate counts at 95 %.
      </p>
    </section>
  );
}
