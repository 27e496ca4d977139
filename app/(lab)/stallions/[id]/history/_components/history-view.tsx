'use client';

import dynamic from 'next/dynamic';
import Link from 'next/link';
import { useState } from 'react';
import { ExportLinks } from '@/components/history/export-links';
import { LoadingPanel } from '@/components/feedback/loading-panel';
import type { StallionHistory } from '@/db/queries/history';
import { billions, fmt, fmtDate, fmtDateTime } from '@/lib/format';
import { last90Range, presetOf, seasonRange, type DateRange } from '@/lib/history/range';
import { HISTORY_DEFECT_LABELS, HISTORY_DEFECTS } from '@/lib/history/series';
import { SUMMARY_FIGURE_LABELS, SUMMARY_FIGURES, type FigureStats } from '@/lib/history/summary';
import { useStallionHistory } from '@/lib/hooks/use-stallion-history';

// recharts draws in the browser only.
const HistoryCharts = dynamic(() => import('@/components/history/history-charts').then((m) => m.HistoryCharts), {
  ssr: false,
  loading: () => <LoadingPanel what="the charts" />,
});

type Choice = { kind: 'season'; year: number } | { kind: 'last90' } | { kind: 'custom' };

function choiceOf(range: DateRange, today: string): Choice {
  const p = presetOf(range, today);
  return p === 'season' ? { kind: 'season', year: Number(range.from.slice(0, 4)) } : p === 'last90' ? { kind: 'last90' } : { kind: 'custom' };
}
const choiceValue = (c: Choice) => (c.kind === 'season' ? `season-${c.year}` : c.kind);

function statsText(s: FigureStats | null, unit: string, digits = 1) {
  if (!s) return { mean: '—', median: '—', range: '—' };
  const f = (v: number) => (unit === '× 10⁹' ? billions(v) : `${fmt(v, digits)} ${unit}`);
  return { mean: f(s.mean), median: f(s.median), range: `${f(s.min)} – ${f(s.max)}` };
}

export function HistoryView({ initial, today }: { initial: StallionHistory; today: string }) {
  const stallionId = initial.stallion.id;
  const [range, setRange] = useState<DateRange>(initial.range);
  const [custom, setCustom] = useState<DateRange>(initial.range);
  const [choice, setChoice] = useState<Choice>(choiceOf(initial.range, today));
  const { data, error, isValidating } = useStallionHistory(stallionId, range, initial);
  const h = data ?? initial;
  const tz = h.timeZone;
  const seasons = [...new Set([...h.seasons, Number(today.slice(0, 4))])].sort((a, b) => b - a);

  function show(next: DateRange) {
    setRange(next);
    window.history.replaceState(null, '', `?${new URLSearchParams({ from: next.from, to: next.to })}`);
  }
  function pick(value: string) {
    if (value === 'last90') {
      setChoice({ kind: 'last90' });
      show(last90Range(today));
    } else if (value === 'custom') {
      setChoice({ kind: 'custom' });
    } else {
      const year = Number(value.replace('season-', ''));
      setChoice({ kind: 'season', year });
      show(seasonRange(year));
    }
  }

  const s = h.summary;
  const eventsById = new Map(h.events.map((e) => [e.id, e]));

  return (
    <div className="space-y-6">
      <section aria-label="Date range of the history" className="card flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="history-range" className="label">Range</label>
          <select id="history-range" className="input" value={choiceValue(choice)} onChange={(e) => pick(e.target.value)}>
            {seasons.map((y) => <option key={y} value={`season-${y}`}>Season {y}</option>)}
            <option value="last90">Last 90 days</option>
            <option value="custom">Custom range</option>
          </select>
        </div>
        {choice.kind === 'custom' && (
          <form
            className="flex flex-wrap items-end gap-3"
            onSubmit={(e) => {
              e.preventDefault();
              if (custom.from && custom.to && custom.from <= custom.to) show(custom);
            }}
          >
            <div>
              <label htmlFor="history-from" className="label">From</label>
              <input id="history-from" type="date" className="input" value={custom.from} max={custom.to} onChange={(e) => setCustom({ ...custom, from: e.target.value })} />
            </div>
            <div>
              <label htmlFor="history-to" className="label">To</label>
              <input id="history-to" type="date" className="input" value={custom.to} min={custom.from} onChange={(e) => setCustom({ ...custom, to: e.target.value })} />
            </div>
            <button type="submit" className="btn" disabled={!custom.from || !custom.to || custom.from > custom.to}>Show</button>
          </form>
        )}
        <p className="text-sm text-ink-soft" aria-live="polite">
          {fmtDate(h.range.from)} – {fmtDate(h.range.to)}: {h.series.length} collection{h.series.length === 1 ? '' : 's'}
          {isValidating && ' (updating…)'}
        </p>
        <div className="ml-auto">
          <ExportLinks endpoint={`/api/stallions/${stallionId}/export`} params={{ from: h.range.from, to: h.range.to }} label="Export this range" />
        </div>
      </section>
      {error && <p role="alert" className="rounded-md bg-danger-bg px-3 py-2 text-sm text-danger">{error.message}</p>}

      <HistoryCharts series={h.series} events={h.events} windows={h.windows} range={h.range} timeZone={tz} />

      <section aria-labelledby="summary-heading" className="card space-y-3">
        <h2 id="summary-heading">Summary of the range</h2>
        <p className="text-sm">
          {s.collections} collection{s.collections === 1 ? '' : 's'}, {s.withRead} with a submitted morphology read.
        </p>
        <div className="overflow-x-auto">
          <table aria-label="Summary of the main figures">
            <thead>
              <tr><th className="th">Figure</th><th className="th">Collections</th><th className="th">Mean</th><th className="th">Median</th><th className="th">Range</th></tr>
            </thead>
            <tbody>
              {SUMMARY_FIGURES.map((f) => {
                const st = s.figures[f];
                const t = statsText(st, SUMMARY_FIGURE_LABELS[f].unit, f === 'concentrationMillionPerMl' ? 0 : 1);
                return (
                  <tr key={f}>
                    <th scope="row" className="td text-left font-medium">{SUMMARY_FIGURE_LABELS[f].label}</th>
                    <td className="td">{st?.n ?? 0}</td>
                    <td className="td">{t.mean}</td>
                    <td className="td">{t.median}</td>
                    <td className="td">{t.range}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
        <dl className="grid gap-x-4 gap-y-1 text-sm sm:grid-cols-[auto_1fr]">
          <dt className="text-ink-soft">Best by PMMN</dt>
          <dd>{s.best ? <Link href={`/collections/${s.best.id}`}>{fmtDateTime(s.best.collectedAt, tz)}</Link> : '—'}{s.best && `: ${billions(s.best.pmmnBillion)}`}</dd>
          <dt className="text-ink-soft">Worst by PMMN</dt>
          <dd>{s.worst ? <Link href={`/collections/${s.worst.id}`}>{fmtDateTime(s.worst.collectedAt, tz)}</Link> : '—'}{s.worst && `: ${billions(s.worst.pmmnBillion)}`}</dd>
          <dt className="text-ink-soft">Inside health-event windows</dt>
          <dd>
            {s.insideWindows.collections} collection{s.insideWindows.collections === 1 ? '' : 's'}
            {s.insideWindows.meanPercentNormal != null && `, mean ${fmt(s.insideWindows.meanPercentNormal)} % normal (${s.insideWindows.withRead} read)`}
          </dd>
          <dt className="text-ink-soft">Outside them</dt>
          <dd>
            {s.outsideWindows.collections} collection{s.outsideWindows.collections === 1 ? '' : 's'}
            {s.outsideWindows.meanPercentNormal != null && `, mean ${fmt(s.outsideWindows.meanPercentNormal)} % normal (${s.outsideWindows.withRead} read)`}
          </dd>
        </dl>
        <p className="text-xs text-ink-faint">Means weigh each collection the same. Figures support, and never replace, a veterinarian’s judgement.</p>
      </section>

      <section aria-labelledby="events-heading" className="card space-y-2">
        <h2 id="events-heading">Health events and their windows</h2>
        {h.events.length === 0 ? (
          <p className="text-sm text-ink-soft">No health events recorded for this stallion.</p>
        ) : (
          <ul className="space-y-1 text-sm">
            {h.events.map((e) => (
              <li key={e.id}>
                <strong>{e.kindLabel}</strong> {e.endedOn && e.endedOn !== e.startedOn ? `${fmtDate(e.startedOn)} – ${fmtDate(e.endedOn)}` : fmtDate(e.startedOn)}
                {e.peakTemperatureC != null && `, peak ${e.peakTemperatureC.toFixed(1)} °C`}: window of {e.window.totalDays} days, clears {fmtDate(e.window.clearsDate)}
                {e.notes && <span className="block text-ink-soft">{e.notes}</span>}
              </li>
            ))}
          </ul>
        )}
        <p className="text-xs text-ink-faint">
          A window runs from an event’s first day until {h.window.spermatogenesisDays} days of spermatogenesis plus {h.window.epididymalTransitDays} days of epididymal transit after its last day (lab settings).
        </p>
      </section>

      <section aria-labelledby="series-heading" className="space-y-2">
        <h2 id="series-heading">Collections in the range</h2>
        <div className="overflow-x-auto rounded-lg border border-line bg-paper-raised">
          <table aria-label="Collections in the range">
            <thead>
              <tr>
                <th className="th">Collected</th><th className="th">% normal (95 % interval)</th>
                {HISTORY_DEFECTS.map((d) => <th key={d} className="th">{HISTORY_DEFECT_LABELS[d]} (%)</th>)}
                <th className="th">Total sperm</th><th className="th">PMMN</th><th className="th">Days since previous</th><th className="th">Window</th>
              </tr>
            </thead>
            <tbody>
              {h.series.length === 0 && <tr><td className="td text-ink-soft" colSpan={HISTORY_DEFECTS.length + 6}>No collections in this range.</td></tr>}
              {h.series.map((p) => (
                <tr key={p.id}>
                  <td className="td whitespace-nowrap"><Link href={`/collections/${p.id}`}>{fmtDateTime(p.collectedAt, tz)}</Link></td>
                  <td className="td whitespace-nowrap">{p.percentNormal == null ? '—' : `${fmt(p.percentNormal)}${p.normalInterval ? ` (${fmt(p.normalInterval.lower)}–${fmt(p.normalInterval.upper)})` : ''}`}</td>
                  {HISTORY_DEFECTS.map((d) => <td key={d} className="td">{fmt(p.defects[d])}</td>)}
                  <td className="td whitespace-nowrap">{billions(p.totalSpermBillion)}</td>
                  <td className="td whitespace-nowrap">{billions(p.pmmnBillion)}</td>
                  <td className="td">{fmt(p.daysSincePrevious)}</td>
                  <td className="td">{p.windows.length ? p.windows.map((w) => `${eventsById.get(w.eventId)?.kindLabel ?? w.label}, day ${w.windowDay} of ${w.windowDays}`).join('; ') : '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>
    </div>
  );
}
