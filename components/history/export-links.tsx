/** Download links for a collection export (CSV and .xlsx), with the range and filters as the query. */
export function ExportLinks({ endpoint, params, label = 'Export' }: { endpoint: string; params: Record<string, string | number | undefined>; label?: string }) {
  const href = (format: 'csv' | 'xlsx') => {
    const q = new URLSearchParams({ format });
    for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== '') q.set(k, String(v));
    return `${endpoint}?${q}`;
  };
  return (
    <div className="flex flex-wrap items-center gap-2" role="group" aria-label={label}>
      <span className="text-sm text-ink-soft">{label}:</span>
      <a className="btn-secondary no-underline hover:no-underline" href={href('csv')} download>
        CSV
      </a>
      <a className="btn-secondary no-underline hover:no-underline" href={href('xlsx')} download>
        Excel (.xlsx)
      </a>
    </div>
  );
}
