import { describe, expect, it } from 'vitest';
import {
  EPIDIDYMAL_TRANSIT_DAYS_DEFAULT,
  SPERMATOGENESIS_DAYS_DEFAULT,
  classifyCollections,
  spermatogenicWindow,
  utcDayNumber,
  windowPosition,
} from '@/lib/windows/window';

describe('spermatogenicWindow', () => {
  it('defaults to 57 + 10 = 67 days', () => {
    // 57 days spermatogenesis (common practice; Swierstra, Gebauer & Pickett 1974, from memory);
    // 10 days transit within the 7.5–11 day average (Gebauer, Pickett & Swierstra 1974, J Anim Sci 39:737–742)
    expect(SPERMATOGENESIS_DAYS_DEFAULT).toBe(57);
    expect(EPIDIDYMAL_TRANSIT_DAYS_DEFAULT).toBe(10);
    const w = spermatogenicWindow('2025-03-01');
    expect(w.totalDays).toBe(67);
    expect(w.start.toISOString()).toBe('2025-03-01T00:00:00.000Z');
    // 1 March + 67 days = 7 May (computed: 30 days to 31 March, 30 in April, 7 in May)
    expect(w.clears.toISOString()).toBe('2025-05-07T00:00:00.000Z');
  });

  it('reduces a Date to its UTC calendar day', () => {
    const w = spermatogenicWindow(new Date('2025-03-01T23:30:00Z'));
    expect(w.start.toISOString()).toBe('2025-03-01T00:00:00.000Z');
    // a time just after midnight UTC on 2 March is the next day
    expect(spermatogenicWindow(new Date('2025-03-02T00:10:00Z')).start.toISOString()).toBe('2025-03-02T00:00:00.000Z');
  });

  it('takes lab settings, including across a leap day', () => {
    const w = spermatogenicWindow('2024-02-20', { spermatogenesisDays: 57, epididymalTransitDays: 8 });
    expect(w.totalDays).toBe(65);
    // 20 Feb 2024 + 65 days = 25 April 2024 (computed: 9 days to 29 Feb, 31 in March, 25 in April)
    expect(w.clears.toISOString()).toBe('2024-04-25T00:00:00.000Z');
    expect(spermatogenicWindow('2025-01-01', { spermatogenesisDays: 0, epididymalTransitDays: 0 }).totalDays).toBe(0);
  });

  it('refuses bad dates and settings', () => {
    expect(() => spermatogenicWindow('2025-02-30')).toThrow(RangeError);
    expect(() => spermatogenicWindow('01/03/2025')).toThrow(RangeError);
    expect(() => spermatogenicWindow(new Date('nope'))).toThrow(RangeError);
    expect(() => spermatogenicWindow('2025-03-01', { spermatogenesisDays: -1 })).toThrow(RangeError);
    expect(() => spermatogenicWindow('2025-03-01', { epididymalTransitDays: 2.5 })).toThrow(RangeError);
  });
});

describe('utcDayNumber', () => {
  it('counts days from 1970-01-01 UTC', () => {
    expect(utcDayNumber('1970-01-01')).toBe(0);
    expect(utcDayNumber('1970-01-02')).toBe(1);
    expect(utcDayNumber(new Date('1969-12-31T12:00:00Z'))).toBe(-1);
    expect(utcDayNumber(new Date('2025-03-01T23:59:59Z'))).toBe(utcDayNumber('2025-03-01'));
  });
});

describe('classifyCollections', () => {
  const collections = [
    { id: 'before', collectedAt: '2025-02-28' },
    { id: 'event-day', collectedAt: new Date('2025-03-01T09:00:00Z') },
    { id: 'day-9', collectedAt: '2025-03-10' },
    { id: 'last-inside', collectedAt: new Date('2025-05-06T23:59:00Z') },
    { id: 'clears-day', collectedAt: '2025-05-07' },
    { id: 'later', collectedAt: '2025-06-15' },
  ];

  it('classifies before / inside / after the half-open window [start, clears)', () => {
    const r = classifyCollections('2025-03-01', collections);
    expect(r.map((c) => [c.id, c.position])).toEqual([
      ['before', 'before'],
      ['event-day', 'inside'],
      ['day-9', 'inside'],
      ['last-inside', 'inside'],
      ['clears-day', 'after'],
      ['later', 'after'],
    ]);
  });

  it('gives each collection its day from the event and keeps its fields', () => {
    const r = classifyCollections('2025-03-01', [{ id: 'x', collectedAt: '2025-03-10', pctNormal: 41 }]);
    expect(r[0]).toEqual({ id: 'x', collectedAt: '2025-03-10', pctNormal: 41, position: 'inside', dayFromEvent: 9 });
    expect(classifyCollections('2025-03-01', collections)[0].dayFromEvent).toBe(-1);
    expect(classifyCollections('2025-03-01', collections)[4].dayFromEvent).toBe(67);
  });

  it('moves the boundary with the settings', () => {
    const r = classifyCollections('2025-03-01', collections, { epididymalTransitDays: 11 });
    expect(r.find((c) => c.id === 'clears-day')!.position).toBe('inside');
  });

  it('returns an empty list for no collections', () => {
    expect(classifyCollections('2025-03-01', [])).toEqual([]);
  });
});

describe('windowPosition', () => {
  it('matches classifyCollections for a single date', () => {
    const w = spermatogenicWindow('2025-03-01');
    expect(windowPosition(w, '2025-02-28')).toBe('before');
    expect(windowPosition(w, '2025-03-01')).toBe('inside');
    expect(windowPosition(w, '2025-05-07')).toBe('after');
  });
});
