import { G, Line, Rect, Svg, Text } from '@react-pdf/renderer';
import { fmt } from '@/lib/format';
import { GROUP_LABELS } from '../labels';
import type { ReportMorphology, SpermGroup } from '../snapshot';
import { PDF_FONT_FAMILY } from './fonts';
import { GROUP_COLOURS, INK, MUTED, RULE } from './styles';

const ROW = 13;
const BAR = 8;
const LABEL_W = 196;
const VALUE_W = 64;
const AXIS_H = 12;
const LEGEND_H = 16;

// react-pdf reads font props on SVG text from the element itself; its types only list presentation attributes.
const font = (size: number, weight = 400) => ({ fontFamily: PDF_FONT_FAMILY, fontSize: size, fontWeight: weight }) as object;

/**
 * Horizontal bars of the class breakdown (% of sperm cells, the "cells normal / abnormal" view),
 * one row per sperm class, coloured by group, with the Wilson interval drawn on the normal row.
 */
export function ClassChart({ morphology, width }: { morphology: ReportMorphology; width: number }) {
  const rows = morphology.perClass;
  const maxPct = Math.max(10, ...rows.map((r) => r.pct ?? 0), morphology.normalInterval?.upperPct ?? 0);
  const scaleMax = Math.min(100, Math.ceil(maxPct / 10) * 10);
  const barW = width - LABEL_W - VALUE_W - 8;
  const x = (pct: number) => LABEL_W + (pct / scaleMax) * barW;
  const height = AXIS_H + rows.length * ROW + 4 + LEGEND_H;
  const ticks = Array.from({ length: scaleMax / 10 + 1 }, (_, i) => i * 10);
  const groups = [...new Set(rows.map((r) => r.group))] as SpermGroup[];
  const legendY = AXIS_H + rows.length * ROW + 6;

  return (
    <Svg width={width} height={height} viewBox={`0 0 ${width} ${height}`}>
      {ticks.map((t) => (
        <G key={t}>
          <Line x1={x(t)} y1={AXIS_H - 2} x2={x(t)} y2={AXIS_H + rows.length * ROW} stroke={RULE} strokeWidth={0.5} />
          <Text x={x(t)} y={AXIS_H - 4} fill={MUTED} textAnchor="middle" {...font(6)}>
            {`${t} %`}
          </Text>
        </G>
      ))}
      <Text x={width} y={AXIS_H - 4} fill={MUTED} textAnchor="end" {...font(6)}>
        % (cells)
      </Text>
      {rows.map((r, i) => {
        const top = AXIS_H + i * ROW;
        const pct = r.pct ?? 0;
        const barTop = top + (ROW - BAR) / 2;
        const interval = r.group === 'normal' && morphology.normalInterval && r.key === rows.find((c) => c.group === 'normal')?.key ? morphology.normalInterval : null;
        return (
          <G key={r.key}>
            <Text x={0} y={top + ROW / 2 + 2.4} fill={INK} {...font(7, r.group === 'normal' ? 600 : 400)}>
              {r.name}
            </Text>
            <Rect x={LABEL_W} y={barTop} width={Math.max(0.01, x(pct) - LABEL_W)} height={BAR} fill={GROUP_COLOURS[r.group]} stroke={INK} strokeWidth={0.4} />
            {interval && (
              <G>
                <Line x1={x(interval.lowerPct)} y1={barTop + BAR / 2} x2={x(interval.upperPct)} y2={barTop + BAR / 2} stroke={INK} strokeWidth={0.8} />
                <Line x1={x(interval.lowerPct)} y1={barTop} x2={x(interval.lowerPct)} y2={barTop + BAR} stroke={INK} strokeWidth={0.8} />
                <Line x1={x(interval.upperPct)} y1={barTop} x2={x(interval.upperPct)} y2={barTop + BAR} stroke={INK} strokeWidth={0.8} />
              </G>
            )}
            <Text x={width} y={top + ROW / 2 + 2.4} fill={INK} textAnchor="end" {...font(7, r.group === 'normal' ? 600 : 400)}>
              {`${fmt(r.pct, 1)} % (${r.count})`}
            </Text>
          </G>
        );
      })}
      {groups.map((g, i) => {
        const gx = i * (width / Math.max(groups.length, 6));
        return (
          <G key={g}>
            <Rect x={gx} y={legendY} width={8} height={6} fill={GROUP_COLOURS[g]} stroke={INK} strokeWidth={0.4} />
            <Text x={gx + 11} y={legendY + 5.5} fill={MUTED} {...font(6.5)}>
              {GROUP_LABELS[g]}
            </Text>
          </G>
        );
      })}
    </Svg>
  );
}
