'use client';

import { Bar, CartesianGrid, Cell, ComposedChart, Line, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { ReaderCollectionPoint } from '@/lib/agreement/quality';
import { fmt } from '@/lib/format';

// Okabe–Ito: bias bars blue, over the acceptable difference vermillion (and hatched by the tooltip's words), kappa black.
const COLOURS = { bias: '#0072B2', over: '#D55E00', kappa: '#1c2430' };

/** One reader's collections in date order: bias bars (left axis, points) and kappa (right axis). */
export function ReaderChart({ points, timeZone }: { points: ReaderCollectionPoint[]; timeZone: string }) {
  const rows = points.map((p) => ({ ...p, label: new Date(p.collectedAt).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', timeZone }) }));
  // Symmetric about 0, so the sign of the bias reads at a glance (a single collection's bar included).
  // A round reach (1, 2, 5, 10, 20, … points) and ticks at its halves, so the axis reads in whole steps.
  const most = Math.max(0, ...rows.map((r) => Math.abs(r.bias ?? 0)));
  const reach = [1, 2, 5, 10, 20, 50, 100].find((n) => n >= most) ?? 100;
  const ticks = [-reach, -reach / 2, 0, reach / 2, reach];
  if (!rows.length) return <p className="py-6 text-center text-sm text-ink-soft">Not compared with another reader in this period.</p>;
  return (
    <div className="h-48">
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={rows} margin={{ top: 8, right: 8, bottom: 0, left: -12 }}>
          <CartesianGrid stroke="#d6dad3" strokeDasharray="3 3" />
          <XAxis dataKey="label" tick={{ fontSize: 11 }} />
          <YAxis yAxisId="bias" domain={[-reach, reach]} ticks={ticks} tick={{ fontSize: 11 }} unit=" pt" />
          <YAxis yAxisId="kappa" orientation="right" domain={[(low: number) => Math.min(0, Math.floor(low * 4) / 4), 1]} tick={{ fontSize: 11 }} />
          <ReferenceLine yAxisId="bias" y={0} stroke="#475467" />
          <Tooltip
            formatter={(value, key) => (key === 'bias' ? [`${fmt(Number(value), 1)} points`, 'Bias in % normal'] : [fmt(Number(value), 2), 'Kappa'])}
            labelFormatter={(_, payload) => {
              const p = payload?.[0]?.payload as ReaderCollectionPoint | undefined;
              return p ? `Collection ${p.collectionId}, read ${p.as} with ${p.otherReader}${p.exceeded ? ' — over the acceptable difference' : ''}` : '';
            }}
          />
          <Bar yAxisId="bias" dataKey="bias" maxBarSize={28} isAnimationActive={false}>
            {rows.map((r) => <Cell key={r.collectionId} fill={r.exceeded ? COLOURS.over : COLOURS.bias} />)}
          </Bar>
          <Line yAxisId="kappa" dataKey="kappa" stroke={COLOURS.kappa} dot={{ r: 3 }} isAnimationActive={false} connectNulls />
        </ComposedChart>
      </ResponsiveContainer>
    </div>
  );
}
