'use client';

import { useRouter } from 'next/navigation';
import { memo, useMemo, type ReactNode } from 'react';
import {
  Area,
  CartesianGrid,
  ComposedChart,
  Legend,
  Line,
  ReferenceArea,
  ReferenceLine,
  ResponsiveContainer,
  Scatter,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import type { DotItemDotProps, MouseHandlerDataParam } from 'recharts';
import { billions, fmt } from '@/lib/format';
import { HISTORY_DEFECT_LABELS, HISTORY_DEFECTS, type HistoryDefect, type HistoryPoint } from '@/lib/history/series';
import type { DateRange } from '@/lib/history/range';
import { labDateEnd, labDateStart } from '@/lib/time/lab-time';

/*
 * The history charts (recharts draws in the browser only; the page loads this without SSR). Every
 * chart shares one x axis (time on the lab's calendar over the chosen range) and the same rows, so a
 * collection sits at the same place in each; hovering shows its values in the chart under the pointer
 * (tooltips synced across all four hid the lines). Health events are marked where they
 * start and their windows (merged where they overlap) are shaded. Clicking a point opens the
 * collection. Colours are from the Okabe–Ito palette and the defect lines differ by dash pattern
 * too, so no series is told apart by colour alone.
 */

export interface ChartEvent {
  id: number;
  kindLabel: string;
  startedOn: string;
}
export interface ChartWindow {
  startDate: string;
  clearsDate: string;
  eventIds: number[];
}

type Row = {
  t: number;
  point: HistoryPoint;
  pctNormal: number | null;
  band: [number, number] | null;
  totalSperm: number | null;
  pmmn: number | null;
  days: number | null;
} & Record<HistoryDefect, number | null>;

const COLOURS = { normal: '#0072B2', band: '#56B4E9', window: '#E69F00', event: '#D55E00', total: '#009E73', pmmn: '#CC79A7', days: '#475467' };
const DEFECT_STYLE: Record<HistoryDefect, { colour: string; dash?: string }> = {
  head: { colour: '#E69F00' },
  midpiece: { colour: '#CC79A7', dash: '6 3' },
  droplet: { colour: '#D55E00', dash: '2 2' },
  tail: { colour: '#0072B2', dash: '8 3 2 3' },
  detachedHead: { colour: '#009E73', dash: '1 4' },
};

function dayLabel(t: number, timeZone: string, withYear = false) {
  return new Date(t).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', ...(withYear ? { year: 'numeric' } : {}), timeZone });
}
const pct = (v: number | null | undefined) => (v == null ? '—' : `${fmt(v)} %`);

function HoverCard({ active, payload, timeZone }: { active?: boolean; payload?: ReadonlyArray<{ payload?: Row }>; timeZone: string }) {
  const row = active ? payload?.[0]?.payload : undefined;
  if (!row) return null;
  const p = row.point;
  return (
    <div role="tooltip" className="max-w-xs rounded-md border border-line bg-paper-raised px-3 py-2 text-xs shadow-md">
      <p className="font-semibold">Collection of {new Date(p.collectedAt).toLocaleString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', timeZone })}</p>
      <p>
        % normal: <strong>{pct(p.percentNormal)}</strong>
        {p.normalInterval && ` (95 % interval ${fmt(p.normalInterval.lower)}–${fmt(p.normalInterval.upper)} %)`}
        {p.cellsCounted != null && `, ${p.cellsCounted} cells`}
        {p.read?.basis === 'first-unchecked' && ', first read'}
      </p>
      {p.percentNormal != null && (
        <p>{HISTORY_DEFECTS.map((d) => `${HISTORY_DEFECT_LABELS[d]} ${pct(p.defects[d])}`).join(' · ')}</p>
      )}
      <p>Total sperm {billions(p.totalSpermBillion)} · PMMN {billions(p.pmmnBillion)}</p>
      <p>Days since previous: {fmt(p.daysSincePrevious)}</p>
      {p.windows.length > 0 && (
        <p className="text-warn">⚑ {p.windows.map((w) => `${w.label}, day ${w.windowDay} of ${w.windowDays}`).join('; ')}</p>
      )}
      <p className="text-ink-faint">Click to open the collection</p>
    </div>
  );
}

function ChartFrame({ title, note, children, empty }: { title: string; note?: string; children: ReactNode; empty: boolean }) {
  return (
    <figure className="card space-y-2">
      <figcaption>
        <span className="font-medium">{title}</span>
        {note && <span className="block text-xs text-ink-faint">{note}</span>}
      </figcaption>
      {empty ? <p className="py-8 text-center text-sm text-ink-soft">No collections in this range.</p> : <div className="h-64">{children}</div>}
    </figure>
  );
}

export const HistoryCharts = memo(function HistoryCharts({ series, events, windows, range, timeZone }: {
  series: HistoryPoint[];
  events: ChartEvent[];
  windows: ChartWindow[];
  range: DateRange;
  timeZone: string;
}) {
  const router = useRouter();
  // The axis spans what there is to see inside the range (collections, event starts, window ends),
  // with a few days either side, so a season of Jan–Dec does not squeeze March–July into a corner.
  const domain = useMemo<[number, number]>(() => {
    const lo = labDateStart(range.from, timeZone).getTime();
    const hi = labDateEnd(range.to, timeZone).getTime();
    const seen = [
      ...series.map((p) => Date.parse(p.collectedAt)),
      ...events.map((e) => labDateStart(e.startedOn, timeZone).getTime()),
      ...windows.map((w) => labDateStart(w.clearsDate, timeZone).getTime()),
    ].filter((t) => t >= lo && t <= hi);
    if (series.length === 0 || seen.length === 0) return [lo, hi];
    const pad = 5 * 86_400_000;
    return [Math.max(lo, Math.min(...seen) - pad), Math.min(hi, Math.max(...seen) + pad)];
  }, [range, timeZone, series, events, windows]);
  const rows = useMemo<Row[]>(
    () =>
      series.map((p) => ({
        t: Date.parse(p.collectedAt),
        point: p,
        pctNormal: p.percentNormal,
        band: p.normalInterval ? [p.normalInterval.lower, p.normalInterval.upper] : null,
        totalSperm: p.totalSpermBillion,
        pmmn: p.pmmnBillion,
        days: p.daysSincePrevious,
        ...p.defects,
      })),
    [series],
  );
  const shaded = useMemo(
    () =>
      windows
        .map((w) => ({ ...w, x1: Math.max(domain[0], labDateStart(w.startDate, timeZone).getTime()), x2: Math.min(domain[1], labDateStart(w.clearsDate, timeZone).getTime()) }))
        .filter((w) => w.x1 < w.x2),
    [windows, domain, timeZone],
  );
  const markers = useMemo(
    () => events.map((e) => ({ ...e, t: labDateStart(e.startedOn, timeZone).getTime() })).filter((e) => e.t >= domain[0] && e.t <= domain[1]),
    [events, domain, timeZone],
  );
  const open = (id: number) => router.push(`/collections/${id}`);
  const onChartClick = (state: MouseHandlerDataParam) => {
    const i = typeof state.activeTooltipIndex === 'number' ? state.activeTooltipIndex : Number(state.activeTooltipIndex);
    const row = Number.isInteger(i) ? rows[i] : undefined;
    if (row) open(row.point.id);
  };

  const eventLabel = (id: number) => events.find((e) => e.id === id)?.kindLabel ?? 'event';
  const decorations = () => [
    ...shaded.map((w) => (
      <ReferenceArea
        key={`w-${w.startDate}`}
        x1={w.x1}
        x2={w.x2}
        fill={COLOURS.window}
        fillOpacity={0.14}
        stroke="none"
        ifOverflow="hidden"
        label={{ value: `${w.eventIds.map(eventLabel).join(' + ')} window (clears ${dayLabel(labDateStart(w.clearsDate, timeZone).getTime(), timeZone, true)})`, position: 'insideTopLeft', fontSize: 11, fill: '#9a5b00' }}
      />
    )),
    ...markers.map((e) => (
      <ReferenceLine key={`e-${e.id}`} x={e.t} stroke={COLOURS.event} strokeDasharray="4 2" label={{ value: e.kindLabel, position: 'insideBottomLeft', fontSize: 11, fill: COLOURS.event }} />
    )),
  ];

  const common = {
    data: rows,
    margin: { top: 8, right: 16, bottom: 4, left: 4 },
    onClick: onChartClick,
    style: { cursor: 'pointer' },
  };
  const xAxis = (
    <XAxis
      dataKey="t"
      type="number"
      scale="time"
      domain={domain}
      allowDataOverflow
      tickFormatter={(t: number) => dayLabel(t, timeZone)}
      tick={{ fontSize: 11 }}
    />
  );
  const tooltip = <Tooltip content={(props) => <HoverCard active={props.active} payload={props.payload as ReadonlyArray<{ payload?: Row }>} timeZone={timeZone} />} />;
  const empty = rows.length === 0;

  // The % normal points are the accessible way in: each is a link with the collection's date and value.
  const normalDot = (props: DotItemDotProps) => {
    const row = props.payload as Row;
    if (row.pctNormal == null || props.cx == null || props.cy == null) return <g key={`n-${props.index}`} />;
    const inWindow = row.point.windows.length > 0;
    const name = `Collection of ${dayLabel(row.t, timeZone, true)}: ${pct(row.pctNormal)} normal${inWindow ? ', inside a health-event window' : ''}`;
    return (
      <circle
        key={`n-${props.index}`}
        cx={props.cx}
        cy={props.cy}
        r={inWindow ? 5 : 4}
        fill={inWindow ? COLOURS.window : COLOURS.normal}
        stroke="#ffffff"
        strokeWidth={1.5}
        role="link"
        tabIndex={0}
        aria-label={name}
        onClick={(ev) => {
          ev.stopPropagation();
          open(row.point.id);
        }}
        onKeyDown={(ev) => {
          if (ev.key === 'Enter') open(row.point.id);
        }}
      />
    );
  };

  return (
    <div className="grid gap-4 xl:grid-cols-2">
      <ChartFrame title="% normal per collection, with its 95 % interval" note="Wilson score interval on the read the figures rest on; points inside a health-event window are orange." empty={empty}>
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart {...common} accessibilityLayer={false}>
            <CartesianGrid stroke="#e4e7e2" />
            {xAxis}
            <YAxis domain={[0, 100]} unit=" %" tick={{ fontSize: 11 }} width={48} />
            {tooltip}
            {decorations()}
            <Area type="linear" dataKey="band" name="95 % interval" stroke="none" fill={COLOURS.band} fillOpacity={0.3} isAnimationActive={false} connectNulls activeDot={false} />
            <Line type="linear" dataKey="pctNormal" name="% normal" stroke={COLOURS.normal} strokeWidth={2} dot={normalDot} activeDot={{ r: 6 }} isAnimationActive={false} connectNulls />
            <Legend verticalAlign="bottom" height={24} wrapperStyle={{ fontSize: 12 }} />
          </ComposedChart>
        </ResponsiveContainer>
      </ChartFrame>

      <ChartFrame title="Main defect groups, % of sperm cells" note="Each cell once, by its main class (the “cells normal / abnormal” view)." empty={empty}>
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart {...common}>
            <CartesianGrid stroke="#e4e7e2" />
            {xAxis}
            <YAxis unit=" %" tick={{ fontSize: 11 }} width={48} />
            {tooltip}
            {decorations()}
            {HISTORY_DEFECTS.map((d) => (
              <Line
                key={d}
                type="linear"
                dataKey={d}
                name={HISTORY_DEFECT_LABELS[d]}
                stroke={DEFECT_STYLE[d].colour}
                strokeDasharray={DEFECT_STYLE[d].dash}
                strokeWidth={2}
                dot={{ r: 2 }}
                isAnimationActive={false}
                connectNulls
              />
            ))}
            <Legend verticalAlign="bottom" height={24} wrapperStyle={{ fontSize: 12 }} />
          </ComposedChart>
        </ResponsiveContainer>
      </ChartFrame>

      <ChartFrame title="Total sperm and PMMN per collection (× 10⁹)" note="PMMN: progressively motile, morphologically normal sperm; it needs a submitted read." empty={empty}>
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart {...common}>
            <CartesianGrid stroke="#e4e7e2" />
            {xAxis}
            <YAxis tick={{ fontSize: 11 }} width={48} />
            {tooltip}
            {decorations()}
            <Line type="linear" dataKey="totalSperm" name="Total sperm" stroke={COLOURS.total} strokeWidth={2} dot={{ r: 2 }} isAnimationActive={false} connectNulls />
            <Line type="linear" dataKey="pmmn" name="PMMN" stroke={COLOURS.pmmn} strokeDasharray="6 3" strokeWidth={2} dot={{ r: 3 }} isAnimationActive={false} connectNulls />
            <Legend verticalAlign="bottom" height={24} wrapperStyle={{ fontSize: 12 }} />
          </ComposedChart>
        </ResponsiveContainer>
      </ChartFrame>

      <ChartFrame title="Days since the previous collection" note="Long rests raise the sperm numbers of the next ejaculate; daily collection lowers them." empty={empty}>
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart {...common}>
            <CartesianGrid stroke="#e4e7e2" />
            {xAxis}
            <YAxis tick={{ fontSize: 11 }} width={48} allowDecimals={false} />
            {tooltip}
            {decorations()}
            <Scatter dataKey="days" name="Days since previous" fill={COLOURS.days} isAnimationActive={false} />
            <Legend verticalAlign="bottom" height={24} wrapperStyle={{ fontSize: 12 }} />
          </ComposedChart>
        </ResponsiveContainer>
      </ChartFrame>
    </div>
  );
});
