import { describe, expect, it } from 'vitest';
import { combine, compareTable, isMet, type Results, table, targetText } from '../../../scripts/bench-run';
import type { Figure } from '../../bench/support';

// npm run bench's runner: medians over runs, the target check, and the comparison of two commits.
const fig = (value: number, baseline: number, over: Partial<Figure> = {}): Figure => ({
  name: 'mark saves/s', unit: 'saves/s', value, baseline: { name: 'bare insert', value: baseline }, better: 'higher', target: { on: 'ratio', min: 0.5 }, ...over,
});

describe('bench runner', () => {
  it('takes the median of each figure and of its baseline over the runs, then the ratio of the medians', () => {
    const [row] = combine('marks-route', [[fig(100, 400, { details: { p99_ms: 30 } })], [fig(300, 500, { details: { p99_ms: 10 } })], [fig(200, 450, { details: { p99_ms: 20 } })]]);
    expect(row!.value).toBe(200);
    expect(row!.baseline).toEqual({ name: 'bare insert', value: 450 });
    expect(row!.ratio).toBeCloseTo(200 / 450, 10);
    expect(row!.details.p99_ms).toBe(20);
    expect(row!.runs).toBe(3);
    expect(row!.met).toBe(false); // 0.44 < 0.5
  });

  it('checks a target on the ratio or on the value, at most or at least', () => {
    expect(isMet({ on: 'ratio', max: 2 }, 999, 2)).toBe(true);
    expect(isMet({ on: 'ratio', max: 2 }, 1, 2.01)).toBe(false);
    expect(isMet({ on: 'value', max: 250 }, 249.9, null)).toBe(true);
    expect(isMet({ on: 'value', max: 0 }, 1, null)).toBe(false);
    expect(isMet({ on: 'value', min: 1 }, 1, null)).toBe(true);
    expect(isMet(null, 1, 1)).toBeNull();
    expect(targetText({ on: 'value', max: 250 }, 'ms')).toBe('≤ 250 ms');
    expect(targetText({ on: 'ratio', min: 0.5 }, 'saves/s')).toBe('ratio ≥ 0.5');
  });

  it('prints one row per figure and compares two commits by each figure’s direction', () => {
    const rows = (v: number, p99: number) => [
      ...combine('marks-route', [[fig(v, 400)]]),
      ...combine('load', [[{ name: 'save p99', unit: 'ms', value: p99, baseline: null, better: 'lower', target: { on: 'value', max: 250 } }]]),
    ];
    const res = (commit: string, v: number, p99: number): Results => ({ commit, dirty: false, date: '2026-12-04', machine: { cpus: 2, model: '', loadavg: [], node: '' }, rows: rows(v, p99), failures: [] });
    expect(table(rows(300, 90)).split('\n')).toHaveLength(4);
    const out = compareTable(res('a'.repeat(40), 200, 100), res('b'.repeat(40), 300, 150));
    expect(out).toMatch(/\| mark saves\/s \| saves\/s \| 200 \| 300 \| \+50\.0 % \(better\) \|/);
    expect(out).toMatch(/\| save p99 \| ms \| 100 \| 150 \| \+50\.0 % \(worse\) \|/);
  });
});
