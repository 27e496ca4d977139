// @bench-runs 1 (npm run bench: its figures are already medians / quantiles of its own rounds)
// Report PDF benchmark: rendering the example report (lib/reports/fixture.ts, three A4 pages:
// tables, the class chart, the QR code) against rendering a one-line PDF with the same fonts in
// the same run. Needs no services. Run: npx tsx tests/bench/report-pdf.bench.ts [--renders N]
//
// - "cold": the first report render of the process (fonts read, converted and parsed, modules warm up).
// - Then N rounds; each round renders the one-line baseline and the report, alternating which goes
//   first. "validate only" is parseReportSnapshot on the stored JSON, which every render does first.
// Exits 0 whatever the numbers are (a measurement, not a test) unless a render fails.
import { createElement } from 'react';
import { Document, Page, Text, renderToBuffer } from '@react-pdf/renderer';
import { exampleReportSnapshot } from '@/lib/reports/fixture';
import { PDF_FONT_FAMILY, registerPdfFonts } from '@/lib/reports/pdf/fonts';
import { renderReportPdf } from '@/lib/reports/pdf/render';
import { parseReportSnapshot } from '@/lib/reports/snapshot';
import { arg, emitFigures, quantile } from './support';

const APP = 'https://reports.quillfield.example';

function oneLine(): Promise<Buffer> {
  return renderToBuffer(
    createElement(Document, null, createElement(Page, { size: 'A4' }, createElement(Text, { style: { fontFamily: PDF_FONT_FAMILY, fontSize: 9 } }, 'Fieldmark'))),
  );
}

async function timed<T>(f: () => Promise<T>): Promise<[number, T]> {
  const t = performance.now();
  const out = await f();
  return [performance.now() - t, out];
}

async function main() {
  const renders = arg('renders', 20);
  const snapshot = exampleReportSnapshot();
  const json = JSON.stringify(snapshot);

  registerPdfFonts();
  const [coldMs, first] = await timed(() => renderReportPdf(snapshot, { appUrl: APP }));
  await oneLine();

  const times: Record<'baseline' | 'report' | 'validate', number[]> = { baseline: [], report: [], validate: [] };
  for (let i = 0; i < renders; i++) {
    const order = i % 2 === 0 ? (['baseline', 'report'] as const) : (['report', 'baseline'] as const);
    for (const name of order) {
      const [ms, pdf] = await timed(() => (name === 'baseline' ? oneLine() : renderReportPdf(snapshot, { appUrl: APP })));
      if (pdf.length === 0) throw new Error(`${name}: empty PDF`);
      times[name].push(ms);
    }
    const [ms] = await timed(async () => parseReportSnapshot(json));
    times.validate.push(ms);
  }

  const p50 = (xs: number[]) => quantile(xs, 0.5);
  const p95 = (xs: number[]) => quantile(xs, 0.95);
  const base = p50(times.baseline);
  const pages = (first.toString('latin1').match(/\/Type \/Page\b/g) ?? []).length;
  const lines = [
    `Report PDF bench: ${renders} renders each, node ${process.version}, @react-pdf/renderer 4.9.0; example report ${pages} pages, ${(first.length / 1024).toFixed(0)} KiB`,
    '',
    '| case | renders | p50 ms | p95 ms | p50 ratio vs one-line PDF |',
    '|---|---|---|---|---|',
    `| one-line PDF (baseline, same fonts) | ${renders} | ${base.toFixed(1)} | ${p95(times.baseline).toFixed(1)} | 1.00 |`,
    `| example report | ${renders} | ${p50(times.report).toFixed(0)} | ${p95(times.report).toFixed(0)} | ${(p50(times.report) / base).toFixed(1)} |`,
    `| example report, cold (first in the process) | 1 | ${coldMs.toFixed(0)} | — | ${(coldMs / base).toFixed(1)} |`,
    `| validate only (parse the stored JSON) | ${renders} | ${p50(times.validate).toFixed(2)} | ${p95(times.validate).toFixed(2)} | ${(p50(times.validate) / base).toFixed(2)} |`,
  ];
  console.log(lines.join('\n'));
  emitFigures('report-pdf', [
    { name: `report PDF render (${pages} pages), p50`, unit: 'ms', value: p50(times.report), baseline: { name: 'one-line PDF', value: base }, better: 'lower', target: null, details: { p95_ms: p95(times.report), cold_ms: coldMs } },
  ]);
}

main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
