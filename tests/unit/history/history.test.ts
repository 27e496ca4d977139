import ExcelJS from 'exceljs';
import { parse } from 'csv-parse/sync';
import { mean, median } from 'mathjs';
import { Readable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { DEFAULT_CLASS_SET } from '@/lib/class-sets/default-set';
import { describeHealthEvent, HEALTH_EVENT_KIND_LABELS } from '@/lib/health/kinds';
import { EXPORT_COLUMNS, exportFileName, exportHeader, exportRow } from '@/lib/history/export';
import { csvStream, xlsxStream } from '@/lib/history/export-stream';
import { last90Range, presetOf, seasonRange } from '@/lib/history/range';
import { historyPoints, historyWindows, type HistoryCollectionRow, type HistoryRead } from '@/lib/history/series';
import { figureStats, seasonSummary } from '@/lib/history/summary';
import { morphologyOfRead, type CellCount } from '@/lib/morphology/engine';
import { isoInZone, labDateEnd, labDateStart } from '@/lib/time/lab-time';
import { healthEventSchema } from '@/lib/validations/health-event';

const classSet = { classSet: DEFAULT_CLASS_SET, targetCells: 200 };
const read = (id: number, kind: 'first' | 'second' | 'settled', status: 'open' | 'submitted', cells: CellCount[]): HistoryRead => ({ readId: id, kind, status, morphology: morphologyOfRead(classSet, cells) });

const row = (id: number, collectedAt: string, over: Partial<HistoryCollectionRow> = {}): HistoryCollectionRow => ({
  id, stallionId: 1, stallion: 'Thistlewick Lantern', collectedAt, numberThatDay: 1, previousAt: null,
  volumeMl: 50, concentrationMillionPerMl: 150, totalMotilityPct: 70, progressiveMotilityPct: 60, ...over,
});

describe('historyPoints', () => {
  // 81 normal of 263 sperm cells (Newcombe 1998 check value 0.2553–0.3662), plus 2 round cells.
  const cells: CellCount[] = [
    { classId: 'normal', count: 81 },
    { classId: 'abnormal_head', count: 40 },
    { classId: 'acrosome_defect', count: 10 },
    { classId: 'abnormal_midpiece', count: 20 },
    { classId: 'proximal_droplet', count: 30 },
    { classId: 'distal_droplet', count: 22 },
    { classId: 'bent_coiled_tail', count: 30 },
    { classId: 'detached_head', count: 26 },
    { classId: 'other', count: 4 },
    { classId: 'round_cell', count: 2 },
  ];
  const rows = [
    row(10, '2026-04-20T09:00:00.000Z'),
    row(11, '2026-05-27T09:00:00.000Z', { previousAt: '2026-04-20T09:00:00.000Z' }),
    row(12, '2026-07-20T09:00:00.000Z', { previousAt: '2026-05-27T09:00:00.000Z', totalMotilityPct: null }),
  ];
  const reads = new Map<number, HistoryRead[]>([
    [10, [read(1, 'first', 'open', cells)]],
    [11, [read(2, 'first', 'submitted', [{ classId: 'normal', count: 150 }, { classId: 'bent_coiled_tail', count: 50 }]), read(3, 'settled', 'submitted', cells)]],
  ]);
  const events = [{ id: 7, stallionId: 1, kind: 'fever' as const, startedOn: '2026-05-04', endedOn: '2026-05-06' }];
  const points = historyPoints(rows, reads, events, { spermatogenesisDays: 57, epididymalTransitDays: 10, timeZone: 'Europe/London' });

  it('gives % normal only for a submitted read, from the settled read when there is one', () => {
    expect(points[0]!.percentNormal).toBeNull(); // the open first read's figures still move
    expect(points[0]!.read).toBeNull();
    expect(points[1]!.read).toEqual({ readId: 3, kind: 'settled', basis: 'settled' });
    expect(points[1]!.percentNormal).toBeCloseTo((81 / 263) * 100, 10);
    // Wilson 95 %: 81/263 → 25.53–36.62 % (Newcombe 1998, Stat Med 17:857–872, method 3)
    expect(points[1]!.normalInterval!.lower).toBeCloseTo(25.53, 2);
    expect(points[1]!.normalInterval!.upper).toBeCloseTo(36.62, 2);
    expect(points[1]!.cellsCounted).toBe(263);
  });

  it('gives the defect groups as % of sperm cells by main class, detached heads apart', () => {
    const d = points[1]!.defects;
    // head = abnormal head + acrosome (+ vacuoles) = 50 of 263; droplets 52; tail 30; midpiece 20; detached 26 (computed)
    expect(d.head).toBeCloseTo((50 / 263) * 100, 10);
    expect(d.midpiece).toBeCloseTo((20 / 263) * 100, 10);
    expect(d.droplet).toBeCloseTo((52 / 263) * 100, 10);
    expect(d.tail).toBeCloseTo((30 / 263) * 100, 10);
    expect(d.detachedHead).toBeCloseTo((26 / 263) * 100, 10);
    expect(points[0]!.defects).toEqual({ head: null, midpiece: null, droplet: null, tail: null, detachedHead: null });
  });

  it('works out the semen totals and PMMN with the read’s % normal', () => {
    // 50 mL × 150 × 10^6/mL = 7.5 × 10^9; 60 % progressive → 4.5 × 10^9 (REFERENCES.md computed example)
    expect(points[0]!.totalSpermBillion).toBeCloseTo(7.5, 12);
    expect(points[0]!.progressivelyMotileBillion).toBeCloseTo(4.5, 12);
    expect(points[0]!.pmmnBillion).toBeNull();
    expect(points[1]!.pmmnBillion).toBeCloseTo(4.5 * (81 / 263), 12);
    // motility missing: total sperm still stands, the rest does not
    expect(points[2]).toMatchObject({ totalSpermBillion: 7.5, progressivelyMotileBillion: null, pmmnBillion: null });
  });

  it('counts days since the previous collection and flags collections inside the window', () => {
    expect(points[0]!.daysSincePrevious).toBeNull();
    expect(points[1]!.daysSincePrevious).toBe(37); // 20 April to 27 May (computed: 10 + 27)
    // fever 4–6 May: 6 May + 67 = 12 July (computed); 27 May is day 24 (28 days in May from the 4th, computed: 27 − 4 + 1)
    expect(points[1]!.windows).toEqual([{ eventId: 7, kind: 'fever', label: 'Fever', windowDay: 24, windowDays: 69, clearsDate: '2026-07-12' }]);
    expect(points[1]!.windowClearsOn).toBe('2026-07-12');
    expect(points[0]!.windows).toEqual([]);
    expect(points[2]!.windows).toEqual([]);
    expect(points[2]!.windowClearsOn).toBeNull();
  });

  it('puts each collection on its lab date', () => {
    const late = historyPoints([row(20, '2026-05-03T23:30:00.000Z')], new Map(), events, { timeZone: 'Europe/London' });
    // 23:30 UTC on 3 May is 00:30 BST on 4 May: the fever's first day in London
    expect(late[0]!.labDate).toBe('2026-05-04');
    expect(late[0]!.windows[0]!.windowDay).toBe(1);
    expect(historyPoints([row(20, '2026-05-03T23:30:00.000Z')], new Map(), events, { timeZone: 'UTC' })[0]!.windows).toEqual([]);
  });

  it('returns merged windows for shading', () => {
    const w = historyWindows([...events, { id: 8, stallionId: 1, kind: 'medication', startedOn: '2026-06-01', endedOn: null }], { timeZone: 'UTC' });
    // 1 June + 67 = 7 August (computed: 30 in June, 31 in July, 7 in August)
    expect(w.merged).toEqual([{ startDate: '2026-05-04', clearsDate: '2026-08-07', eventIds: [7, 8] }]);
    expect(w.perEvent.get(7)).toMatchObject({ clearsDate: '2026-07-12', totalDays: 69 });
  });

  it('handles no collections', () => {
    expect(historyPoints([], new Map(), events, {})).toEqual([]);
  });
});

describe('season summary', () => {
  it('figureStats agrees with mathjs', () => {
    const xs = [41.5, 73.2, 80.1, 55.0, 62.4, 77.7];
    const s = figureStats(xs)!;
    // general-purpose library as the reference (mathjs mean and median)
    expect(s.mean).toBeCloseTo(mean(xs) as number, 12);
    expect(s.median).toBeCloseTo(median(xs) as number, 12);
    expect([s.min, s.max, s.n]).toEqual([41.5, 80.1, 6]);
    expect(figureStats([3, 1, 2])!.median).toBe(median([3, 1, 2]));
    expect(figureStats([])).toBeNull();
  });

  it('finds the best and worst collections by PMMN and compares inside and outside windows', () => {
    const base = historyPoints([row(1, '2026-03-01T09:00:00.000Z'), row(2, '2026-03-05T09:00:00.000Z'), row(3, '2026-05-20T09:00:00.000Z'), row(4, '2026-05-25T09:00:00.000Z'), row(5, '2026-08-01T09:00:00.000Z')], new Map([
      [1, [read(1, 'first', 'submitted', [{ classId: 'normal', count: 160 }, { classId: 'bent_coiled_tail', count: 40 }])]], // 80 %
      [2, [read(2, 'first', 'submitted', [{ classId: 'normal', count: 150 }, { classId: 'bent_coiled_tail', count: 50 }])]], // 75 %
      [3, [read(3, 'first', 'submitted', [{ classId: 'normal', count: 90 }, { classId: 'proximal_droplet', count: 110 }])]], // 45 %
      [4, [read(4, 'first', 'submitted', [{ classId: 'normal', count: 110 }, { classId: 'proximal_droplet', count: 90 }])]], // 55 %
    ]), [{ id: 9, stallionId: 1, kind: 'fever', startedOn: '2026-05-04', endedOn: null }], { timeZone: 'UTC' });
    const s = seasonSummary(base);
    expect(s.collections).toBe(5);
    expect(s.withRead).toBe(4);
    expect(s.best).toMatchObject({ id: 1 }); // PMMN = 4.5 × 80 % = 3.6 × 10^9 (computed)
    expect(s.best!.pmmnBillion).toBeCloseTo(3.6, 12);
    expect(s.worst).toMatchObject({ id: 3 }); // 4.5 × 45 % = 2.025 (computed)
    expect(s.insideWindows).toEqual({ collections: 2, withRead: 2, meanPercentNormal: 50 });
    expect(s.outsideWindows.collections).toBe(3);
    expect(s.outsideWindows.withRead).toBe(2);
    expect(s.outsideWindows.meanPercentNormal).toBeCloseTo(77.5, 10);
    expect(s.figures.percentNormal!.median).toBeCloseTo(median([80, 75, 45, 55]) as number, 10);
    expect(s.figures.totalSpermBillion!.n).toBe(5);
  });

  it('is empty but well-formed for no collections', () => {
    const s = seasonSummary([]);
    expect(s).toMatchObject({ collections: 0, withRead: 0, best: null, worst: null, insideWindows: { collections: 0, meanPercentNormal: null } });
    expect(Object.values(s.figures).every((f) => f === null)).toBe(true);
  });
});

describe('ranges', () => {
  it('offers seasons, the last 90 days and custom ranges', () => {
    expect(seasonRange(2026)).toEqual({ from: '2026-01-01', to: '2026-12-31' });
    // 90 days ending 3 Dec 2026 start on 5 Sept (computed: 26 in Sept incl. the 5th, 31 in Oct, 30 in Nov, 3 in Dec = 90)
    expect(last90Range('2026-12-03')).toEqual({ from: '2026-09-05', to: '2026-12-03' });
    expect(presetOf(seasonRange(2025), '2026-12-03')).toBe('season');
    expect(presetOf(last90Range('2026-12-03'), '2026-12-03')).toBe('last90');
    expect(presetOf({ from: '2026-05-01', to: '2026-06-01' }, '2026-12-03')).toBe('custom');
  });

  it('turns lab dates into instants on the lab’s clock', () => {
    // London, summer time: 4 May begins 23:00 UTC on 3 May; 5 May too
    expect(labDateStart('2026-05-04', 'Europe/London').toISOString()).toBe('2026-05-03T23:00:00.000Z');
    expect(labDateEnd('2026-05-04', 'Europe/London').toISOString()).toBe('2026-05-04T23:00:00.000Z');
    // the day the clocks go forward (29 March 2026, EU rule: last Sunday of March) has 23 hours
    expect(labDateEnd('2026-03-29', 'Europe/London').getTime() - labDateStart('2026-03-29', 'Europe/London').getTime()).toBe(23 * 3600e3);
  });
});

describe('health events', () => {
  it('validates the form', () => {
    expect(healthEventSchema.safeParse({ kind: 'fever', startedOn: '2026-05-04', endedOn: '2026-05-06', peakTemperatureC: '39,8', notes: ' x ' }).data).toEqual({ kind: 'fever', startedOn: '2026-05-04', endedOn: '2026-05-06', peakTemperatureC: 39.8, notes: 'x' });
    const bad = healthEventSchema.safeParse({ kind: 'injury', startedOn: '2026-05-04', endedOn: '2026-05-01', peakTemperatureC: 39 });
    expect(bad.success).toBe(false);
    expect(bad.error!.issues.map((i) => i.path.join('.')).sort()).toEqual(['endedOn', 'peakTemperatureC']);
    expect(healthEventSchema.safeParse({ kind: 'cold', startedOn: '2026-05-04' }).success).toBe(false);
    expect(healthEventSchema.safeParse({ kind: 'fever', startedOn: '2999-01-01' }).success).toBe(false);
    expect(healthEventSchema.safeParse({ kind: 'fever', startedOn: '2026-05-04', peakTemperatureC: 52 }).success).toBe(false);
    expect(healthEventSchema.safeParse({ kind: 'other', startedOn: '2026-05-04', endedOn: '' }).data).toMatchObject({ endedOn: null });
  });

  it('describes an event for the report in one line', () => {
    expect(describeHealthEvent({ peakTemperatureC: 39.8, notes: 'Treated by the attending vet.' })).toBe('Peak temperature 39.8 °C — Treated by the attending vet.');
    expect(describeHealthEvent({ peakTemperatureC: null, notes: '  ' })).toBeNull();
    expect(HEALTH_EVENT_KIND_LABELS.fever).toBe('Fever'); // the kind a signed report prints (lib/reports/fixture.ts)
  });
});

describe('exports', () => {
  const points = historyPoints(
    [row(1, '2026-05-27T08:35:00.000Z', { stallion: 'Thistlewick Lantern, "Lanty"' }), row(2, '2026-01-10T09:00:00.000Z', { volumeMl: null })],
    new Map([[1, [read(1, 'first', 'submitted', [{ classId: 'normal', count: 81 }, { classId: 'proximal_droplet', count: 182 }])]]]),
    [{ id: 7, stallionId: 1, kind: 'fever', startedOn: '2026-05-04', endedOn: '2026-05-06' }],
    { timeZone: 'Europe/London' },
  );
  async function* chunks() {
    yield points.slice(0, 1);
    yield points.slice(1);
  }
  const text = async (r: Readable) => {
    const parts: Buffer[] = [];
    for await (const c of r) parts.push(Buffer.from(c));
    return Buffer.concat(parts);
  };

  it('writes instants with the lab’s offset and numbers unformatted', () => {
    // 08:35 UTC on 27 May is 09:35 BST (+01:00); on 10 January London keeps UTC (+00:00)
    expect(isoInZone('2026-05-27T08:35:00.000Z', 'Europe/London')).toBe('2026-05-27T09:35:00.000+01:00');
    expect(isoInZone('2026-01-10T09:00:00.000Z', 'Europe/London')).toBe('2026-01-10T09:00:00.000+00:00');
    expect(isoInZone('2026-01-10T09:00:00.000Z', 'Asia/Kolkata')).toBe('2026-01-10T14:30:00.000+05:30');
    const r = exportRow(points[0]!, 'Europe/London');
    const col = (h: string) => r[exportHeader().indexOf(h)];
    expect(col('Collected at')).toBe('2026-05-27T09:35:00.000+01:00');
    expect(col('Normal (%)')).toBe((81 / 263) * 100);
    expect(col('Total sperm (10^9)')).toBe(7.5);
    expect(col('Inside health-event windows')).toBe('Fever (day 24 of 69)');
    expect(col('Window clears on')).toBe('2026-07-12');
    expect(EXPORT_COLUMNS.length).toBe(exportHeader().length);
    expect(exportFileName('Thistlewick Lantern', { from: '2026-01-01', to: '2026-12-31' }, 'csv')).toBe('thistlewick-lantern_2026-01-01_to_2026-12-31.csv');
  });

  it('streams CSV (UTF-8, byte order mark, header row) that csv-parse reads back', async () => {
    const buf = await text(csvStream(chunks(), 'Europe/London'));
    expect([...buf.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    const rows: string[][] = parse(buf, { bom: true });
    expect(rows[0]).toEqual(exportHeader());
    expect(rows).toHaveLength(3);
    const get = (i: number, h: string) => rows[i]![exportHeader().indexOf(h)];
    expect(get(1, 'Stallion')).toBe('Thistlewick Lantern, "Lanty"'); // quoted as RFC 4180 says
    expect(Number(get(1, 'Normal (%)'))).toBe((81 / 263) * 100); // full precision survives the text
    expect(get(2, 'Gel-free volume (mL)')).toBe('');
    expect(get(2, 'Total sperm (10^9)')).toBe('');
  });

  it('streams an .xlsx workbook that exceljs reads back, numbers as numbers', async () => {
    const buf = await text(xlsxStream(chunks(), 'Europe/London', 'Thistlewick: Lantern'));
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(buf as unknown as ArrayBuffer);
    const sheet = wb.worksheets[0]!;
    expect(sheet.name).toBe('Thistlewick  Lantern');
    expect((sheet.getRow(1).values as unknown[]).slice(1)).toEqual(exportHeader());
    const cell = (r: number, h: string) => sheet.getRow(r).getCell(exportHeader().indexOf(h) + 1).value;
    expect(cell(2, 'Normal (%)')).toBe((81 / 263) * 100);
    expect(cell(2, 'Collected at')).toBe('2026-05-27T09:35:00.000+01:00');
    expect(cell(3, 'Gel-free volume (mL)')).toBeNull();
    expect(sheet.rowCount).toBe(3);
  });
});
