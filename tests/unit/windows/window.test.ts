import { describe, expect, it } from 'vitest';
import { LAB_SETTINGS_DEFAULTS } from '@/lib/settings/lab-settings';
import {
  EPIDIDYMAL_TRANSIT_DAYS_DEFAULT,
  SPERMATOGENESIS_DAYS_DEFAULT,
  classifyCollections,
  dateDayNumber,
  dayNumberDate,
  eventWindows,
  flagCollections,
  labDate,
  labDayNumber,
  mergeWindows,
  reEvaluateFrom,
  spermatogenicWindow,
  windowDay,
  windowPosition,
} from '@/lib/windows/window';

// Clock changes used below: in the EU summer time starts on the last Sunday of March and ends on
// the last Sunday of October, both at 01:00 UTC (Directive 2000/84/EC, art. 2 and 3); in the United
// States it runs from the second Sunday of March to the first Sunday of November, 02:00 local
// (Energy Policy Act of 2005, sec. 110). In 2025 those Sundays are 30 March / 26 October and
// 9 March / 2 November (calendar). Offsets: Berlin CET+1 / CEST+2, London GMT+0 / BST+1,
// New York EST−5 / EDT−4.
const HOUR = 3_600_000;
const DAY = 24 * HOUR;
const iso = (d: Date) => d.toISOString();

describe('spermatogenicWindow', () => {
  it('defaults to 57 + 10 = 67 days', () => {
    // 57 days spermatogenesis (common practice; Swierstra, Gebauer & Pickett 1974, from memory);
    // 10 days transit within the 7.5–11 day average (Gebauer, Pickett & Swierstra 1974, J Anim Sci 39:737–742)
    expect(SPERMATOGENESIS_DAYS_DEFAULT).toBe(57);
    expect(EPIDIDYMAL_TRANSIT_DAYS_DEFAULT).toBe(10);
    const w = spermatogenicWindow('2025-03-01');
    expect(w.totalDays).toBe(67);
    // 1 March + 67 days = 7 May (computed: 30 days to 31 March, 30 in April, 7 in May); day 67 is 6 May
    expect(w).toMatchObject({ startDate: '2025-03-01', lastDate: '2025-05-06', clearsDate: '2025-05-07', timeZone: 'UTC' });
    expect(iso(w.start)).toBe('2025-03-01T00:00:00.000Z');
    expect(iso(w.clears)).toBe('2025-05-07T00:00:00.000Z');
  });

  it('takes the lab settings object as it is', () => {
    const w = spermatogenicWindow('2025-03-01', { ...LAB_SETTINGS_DEFAULTS, timeZone: 'Europe/Berlin' });
    expect(w.totalDays).toBe(67);
    expect(w.timeZone).toBe('Europe/Berlin');
  });

  it('counts lab days across the EU spring change: the window is one hour short of 67 × 24 h', () => {
    // Berlin: 1 March 00:00 CET = 28 Feb 23:00 UTC; 7 May 00:00 CEST = 6 May 22:00 UTC
    const w = spermatogenicWindow('2025-03-01', { timeZone: 'Europe/Berlin' });
    expect(w.clearsDate).toBe('2025-05-07');
    expect(iso(w.start)).toBe('2025-02-28T23:00:00.000Z');
    expect(iso(w.clears)).toBe('2025-05-06T22:00:00.000Z');
    expect(w.clears.getTime() - w.start.getTime()).toBe(67 * DAY - HOUR);
    // Adding 67 × 24 h to the start instant would reach 7 May 01:00 local and keep a collection
    // at 00:30 on 7 May inside; on the lab's calendar it is the clearing day.
    expect(windowPosition(w, new Date('2025-05-06T22:30:00Z'))).toBe('after'); // 7 May 00:30 CEST
    expect(windowPosition(w, new Date('2025-05-06T21:30:00Z'))).toBe('inside'); // 6 May 23:30 CEST
  });

  it('counts lab days across the US autumn change: one hour longer than 67 × 24 h', () => {
    // New York: 1 Sept 00:00 EDT = 04:00 UTC; 7 Nov 00:00 EST = 05:00 UTC
    const w = spermatogenicWindow('2025-09-01', { timeZone: 'America/New_York' });
    expect(w.clearsDate).toBe('2025-11-07');
    expect(iso(w.start)).toBe('2025-09-01T04:00:00.000Z');
    expect(iso(w.clears)).toBe('2025-11-07T05:00:00.000Z');
    expect(w.clears.getTime() - w.start.getTime()).toBe(67 * DAY + HOUR);
    expect(windowPosition(w, new Date('2025-11-07T04:30:00Z'))).toBe('inside'); // 6 Nov 23:30 EST
    expect(windowPosition(w, new Date('2025-11-07T05:00:00Z'))).toBe('after'); // 7 Nov 00:00 EST
  });

  it('a window that clears on the day the clocks go back (Berlin, 26 October 2025)', () => {
    // 20 Aug + 67 days = 26 Oct (computed: 11 days to 31 Aug, 30 in Sept, 26 in Oct)
    const w = spermatogenicWindow('2025-08-20', { timeZone: 'Europe/Berlin' });
    expect(w.clearsDate).toBe('2025-10-26');
    // 26 Oct begins at 00:00 CEST = 25 Oct 22:00 UTC (the change is at 01:00 UTC)
    expect(iso(w.clears)).toBe('2025-10-25T22:00:00.000Z');
    expect(windowDay(w, new Date('2025-10-25T21:30:00Z'))).toBe(67); // 25 Oct 23:30 CEST
    expect(windowDay(w, new Date('2025-10-25T22:30:00Z'))).toBeNull(); // 26 Oct 00:30 CEST
  });

  it('a lab day whose midnight is skipped begins at 01:00 (America/Santiago, 8 September 2024)', () => {
    // Chile moved its clocks from 00:00 to 01:00 that night: the day begins 01:00 −03 = 04:00 UTC
    // (the runtime's IANA zone data, checked with Intl below)
    const w = spermatogenicWindow('2024-09-08', { timeZone: 'America/Santiago' });
    expect(iso(w.start)).toBe('2024-09-08T04:00:00.000Z');
    const wall = new Intl.DateTimeFormat('en-CA', { timeZone: 'America/Santiago', dateStyle: 'short', timeStyle: 'short', hourCycle: 'h23' });
    expect(wall.format(w.start)).toBe('2024-09-08, 01:00');
    expect(wall.format(new Date(w.start.getTime() - 60_000))).toBe('2024-09-07, 23:59');
  });

  it('leap years: 29 February is a day like any other, and century years follow the Gregorian rule', () => {
    // 15 Jan + 67 days (computed: 16 days to 31 Jan, then February, then March):
    // 2024 (leap): 16 + 29 = 45, + 22 → clears 22 March; 2025: 16 + 28 = 44, + 23 → 23 March
    expect(spermatogenicWindow('2024-01-15').clearsDate).toBe('2024-03-22');
    expect(spermatogenicWindow('2025-01-15').clearsDate).toBe('2025-03-23');
    // 2000 was a leap year (divisible by 400), 2100 will not be (divisible by 100, not 400)
    expect(spermatogenicWindow('2000-01-15').clearsDate).toBe('2000-03-22');
    expect(spermatogenicWindow('2100-01-15').clearsDate).toBe('2100-03-23');
    // 29 Feb 2024 is day 46 of the window opened on 15 Jan (computed: 17 days in Jan, 29 in Feb)
    const w = spermatogenicWindow('2024-01-15');
    expect(windowDay(w, '2024-02-29')).toBe(46);
    expect(windowDay(w, '2024-03-21')).toBe(67);
    expect(windowDay(w, '2024-03-22')).toBeNull();
    // an event on the leap day itself
    expect(spermatogenicWindow('2024-02-29').clearsDate).toBe('2024-05-06'); // 1 + 31 + 30 + 5 = 67 (computed)
    // and across a year end: 1 Dec 2024 + 67 = 6 Feb 2025 (computed: 31 + 31 + 5)
    expect(spermatogenicWindow('2024-12-01').clearsDate).toBe('2025-02-06');
  });

  it('takes other window lengths from the lab settings', () => {
    const w = spermatogenicWindow('2024-02-20', { spermatogenesisDays: 57, epididymalTransitDays: 8 });
    expect(w.totalDays).toBe(65);
    // 20 Feb 2024 + 65 days = 25 April 2024 (computed: 9 days to 29 Feb, 31 in March, 25 in April)
    expect(w.clearsDate).toBe('2024-04-25');
    const none = spermatogenicWindow('2025-01-01', { spermatogenesisDays: 0, epididymalTransitDays: 0 });
    expect(none.totalDays).toBe(0);
    expect(windowPosition(none, '2025-01-01')).toBe('after');
  });

  it('an event given as an instant starts on its lab date', () => {
    // 23:30 on 1 March in New York is 04:30 UTC on 2 March
    expect(spermatogenicWindow(new Date('2025-03-02T04:30:00Z'), { timeZone: 'America/New_York' }).startDate).toBe('2025-03-01');
    expect(spermatogenicWindow(new Date('2025-03-02T04:30:00Z')).startDate).toBe('2025-03-02');
    expect(spermatogenicWindow('2025-03-02T04:30:00Z', { timeZone: 'America/New_York' }).startDate).toBe('2025-03-01');
  });

  it('refuses bad dates, zones and settings', () => {
    expect(() => spermatogenicWindow('2025-02-29')).toThrow(RangeError);
    expect(() => spermatogenicWindow('01/03/2025')).toThrow(RangeError);
    expect(() => spermatogenicWindow('2025-03-01T10:00')).toThrow(RangeError); // a time without a zone is ambiguous
    expect(() => spermatogenicWindow(new Date('nope'))).toThrow(RangeError);
    expect(() => spermatogenicWindow('2025-03-01', { timeZone: 'Mars/Olympus' })).toThrow(/time zone/);
    expect(() => spermatogenicWindow('2025-03-01', { spermatogenesisDays: -1 })).toThrow(RangeError);
    expect(() => spermatogenicWindow('2025-03-01', { epididymalTransitDays: 2.5 })).toThrow(RangeError);
  });
});

describe('lab dates', () => {
  it('reduces an instant to its date on the lab’s clock', () => {
    // 23:30 EDT on 6 May = 03:30 UTC on 7 May
    expect(labDate(new Date('2025-05-07T03:30:00Z'), 'America/New_York')).toBe('2025-05-06');
    expect(labDate(new Date('2025-05-07T03:30:00Z'), 'UTC')).toBe('2025-05-07');
    // 00:30 CEST on 7 May = 22:30 UTC on 6 May
    expect(labDate('2025-05-06T22:30:00.000Z', 'Europe/Berlin')).toBe('2025-05-07');
    expect(labDate('2025-05-07T00:30:00+02:00', 'Europe/Berlin')).toBe('2025-05-07');
    // a date stays the date, whatever the zone
    expect(labDate('2025-05-06', 'Pacific/Auckland')).toBe('2025-05-06');
  });

  it('numbers days from 1970-01-01', () => {
    expect(dateDayNumber('1970-01-01')).toBe(0);
    expect(dateDayNumber('1970-01-02')).toBe(1);
    expect(dayNumberDate(dateDayNumber('2024-02-29'))).toBe('2024-02-29');
    expect(labDayNumber(new Date('1969-12-31T12:00:00Z'))).toBe(-1);
    expect(labDayNumber(new Date('2025-03-01T23:59:59Z'))).toBe(dateDayNumber('2025-03-01'));
  });
});

describe('classifyCollections', () => {
  const collections = [
    { id: 'before', collectedAt: '2025-02-28' },
    { id: 'event-day', collectedAt: new Date('2025-03-01T09:00:00Z') },
    { id: 'day-10', collectedAt: '2025-03-10' },
    { id: 'last-inside', collectedAt: new Date('2025-05-06T23:59:00Z') },
    { id: 'clears-day', collectedAt: '2025-05-07' },
    { id: 'later', collectedAt: '2025-06-15' },
  ];

  it('classifies before / inside / after the half-open window [start, clears)', () => {
    const r = classifyCollections('2025-03-01', collections);
    expect(r.map((c) => [c.id, c.position, c.windowDay])).toEqual([
      ['before', 'before', null],
      ['event-day', 'inside', 1],
      ['day-10', 'inside', 10],
      ['last-inside', 'inside', 67],
      ['clears-day', 'after', null],
      ['later', 'after', null],
    ]);
  });

  it('gives each collection its day from the event and keeps its fields', () => {
    const r = classifyCollections('2025-03-01', [{ id: 'x', collectedAt: '2025-03-10', pctNormal: 41 }]);
    expect(r[0]).toEqual({ id: 'x', collectedAt: '2025-03-10', pctNormal: 41, position: 'inside', dayFromEvent: 9, windowDay: 10 });
    expect(classifyCollections('2025-03-01', collections)[0]!.dayFromEvent).toBe(-1);
    expect(classifyCollections('2025-03-01', collections)[4]!.dayFromEvent).toBe(67);
  });

  it('a collection late in the evening on the lab’s clock is that day, though UTC says the next', () => {
    // New York: 6 May 23:30 EDT = 7 May 03:30 UTC. Counted in UTC days it would fall on the clearing
    // day; on the lab's calendar it is day 67, the last day inside.
    const late = [{ id: 'late', collectedAt: new Date('2025-05-07T03:30:00Z') }];
    const ny = classifyCollections('2025-03-01', late, { timeZone: 'America/New_York' });
    expect(ny[0]).toMatchObject({ position: 'inside', windowDay: 67, dayFromEvent: 66 });
    expect(classifyCollections('2025-03-01', late)[0]).toMatchObject({ position: 'after', windowDay: null });
    // and the morning before: 1 March 00:30 CET in Berlin is still 28 Feb in UTC, but day 1 in the lab
    const early = [{ id: 'early', collectedAt: new Date('2025-02-28T23:30:00Z') }];
    expect(classifyCollections('2025-03-01', early, { timeZone: 'Europe/Berlin' })[0]).toMatchObject({ position: 'inside', windowDay: 1 });
    expect(classifyCollections('2025-03-01', early)[0]).toMatchObject({ position: 'before', windowDay: null });
  });

  it('moves the boundary with the settings', () => {
    const r = classifyCollections('2025-03-01', collections, { epididymalTransitDays: 11 });
    expect(r.find((c) => c.id === 'clears-day')!.position).toBe('inside');
  });

  it('returns an empty list for no collections', () => {
    expect(classifyCollections('2025-03-01', [])).toEqual([]);
  });
});

describe('windowPosition and windowDay', () => {
  it('match classifyCollections date by date, in several zones', () => {
    // Every day from 10 days before to 10 days after the window, at 00:30, 12:00 and 23:30 on the
    // lab's clock: the single-date functions and the list classification must agree.
    for (const timeZone of ['UTC', 'Europe/London', 'America/New_York', 'Pacific/Auckland']) {
      const settings = { timeZone };
      const w = spermatogenicWindow('2025-03-01', settings);
      const collections: { id: string; collectedAt: Date }[] = [];
      for (let d = -10; d < 77; d++) {
        for (const h of [0.5, 12, 23.5]) {
          const at = new Date(w.start.getTime() + d * DAY + h * HOUR);
          collections.push({ id: `${d}/${h}`, collectedAt: at });
        }
      }
      const classified = classifyCollections('2025-03-01', collections, settings);
      expect(classified).toHaveLength(collections.length);
      classified.forEach((c, i) => {
        expect(c.id).toBe(collections[i]!.id);
        expect(c.position, `${timeZone} ${c.id}`).toBe(windowPosition(w, c.collectedAt));
        expect(c.windowDay, `${timeZone} ${c.id}`).toBe(windowDay(w, c.collectedAt));
      });
      // and the classification is not trivially constant: all three positions occur
      expect(new Set(classified.map((c) => c.position))).toEqual(new Set(['before', 'inside', 'after']));
    }
  });

  it('first and last day of a window', () => {
    const w = spermatogenicWindow('2025-03-01');
    expect(windowPosition(w, '2025-02-28')).toBe('before');
    expect(windowPosition(w, '2025-03-01')).toBe('inside');
    expect(windowDay(w, '2025-03-01')).toBe(1);
    expect(windowPosition(w, '2025-05-06')).toBe('inside');
    expect(windowDay(w, '2025-05-06')).toBe(67);
    expect(windowPosition(w, '2025-05-07')).toBe('after');
  });
});

describe('several events', () => {
  // A fever on 1 March (clears 7 May) and a treatment on 20 April (clears 26 June, computed:
  // 10 days to 30 April, 31 in May, 26 in June) overlap; an injury on 1 September stands alone.
  const events = [
    { id: 'injury', startDate: '2025-09-01' },
    { id: 'fever', startDate: '2025-03-01' },
    { id: 'treatment', startDate: '2025-04-20' },
  ];

  it('lists each event’s window by start date', () => {
    expect(eventWindows(events).map((w) => [w.eventId, w.startDate, w.clearsDate])).toEqual([
      ['fever', '2025-03-01', '2025-05-07'],
      ['treatment', '2025-04-20', '2025-06-26'],
      ['injury', '2025-09-01', '2025-11-07'],
    ]);
  });

  it('merges overlapping windows into one stretch, and touching ones too', () => {
    expect(mergeWindows(eventWindows(events)).map((m) => [m.startDate, m.clearsDate, m.eventIds])).toEqual([
      ['2025-03-01', '2025-06-26', ['fever', 'treatment']],
      ['2025-09-01', '2025-11-07', ['injury']],
    ]);
    // a window starting the day another clears leaves no clean day between them
    const touching = eventWindows([{ id: 'a', startDate: '2025-03-01' }, { id: 'b', startDate: '2025-05-07' }]);
    expect(mergeWindows(touching).map((m) => m.eventIds)).toEqual([['a', 'b']]);
    const apart = eventWindows([{ id: 'a', startDate: '2025-03-01' }, { id: 'b', startDate: '2025-05-08' }]);
    expect(mergeWindows(apart).map((m) => m.eventIds)).toEqual([['a'], ['b']]);
    // one window inside another does not shorten the stretch: 1 March + 57 days clears 27 April;
    // 20 March + 5 days clears 25 March (computed)
    const nested = [
      { ...spermatogenicWindow('2025-03-01', { epididymalTransitDays: 0 }), eventId: 'a' },
      { ...spermatogenicWindow('2025-03-20', { spermatogenesisDays: 5, epididymalTransitDays: 0 }), eventId: 'c' },
    ];
    expect(mergeWindows(nested).map((m) => [m.startDate, m.clearsDate, m.eventIds])).toEqual([['2025-03-01', '2025-04-27', ['a', 'c']]]);
  });

  it('flags a collection once, lists every event covering it with its day, and clears with the stretch', () => {
    const collections = [
      { id: 'c-feb', collectedAt: '2025-02-20' },
      { id: 'c-mar', collectedAt: '2025-03-10' },
      { id: 'c-may', collectedAt: new Date('2025-05-01T10:00:00Z') },
      { id: 'c-jun', collectedAt: '2025-06-25' },
      { id: 'c-jun-clear', collectedAt: '2025-06-26' },
      { id: 'c-sep', collectedAt: '2025-09-01' },
    ];
    const r = flagCollections(events, collections);
    expect(r.map((c) => [c.id, c.window?.clearsDate ?? null])).toEqual([
      ['c-feb', null],
      ['c-mar', '2025-06-26'], // only the fever covers it, but the stretch runs on to 26 June
      ['c-may', '2025-06-26'],
      ['c-jun', '2025-06-26'],
      ['c-jun-clear', null],
      ['c-sep', '2025-11-07'],
    ]);
    // 1 May: day 62 of the fever (computed: 31 in March, 30 in April, + 1) and day 12 of the treatment (11 in April + 1)
    expect(r[2]!.window!.events).toEqual([
      { eventId: 'fever', windowDay: 62, startDate: '2025-03-01', clearsDate: '2025-05-07' },
      { eventId: 'treatment', windowDay: 12, startDate: '2025-04-20', clearsDate: '2025-06-26' },
    ]);
    expect(r[1]!.window!.events.map((e) => [e.eventId, e.windowDay])).toEqual([['fever', 10]]);
    expect(r[3]!.window!.events.map((e) => [e.eventId, e.windowDay])).toEqual([['treatment', 67]]);
    expect(r[5]!.window!.events.map((e) => [e.eventId, e.windowDay])).toEqual([['injury', 1]]);
    // the collection's own fields are kept
    expect(r[0]).toEqual({ id: 'c-feb', collectedAt: '2025-02-20', window: null });
  });

  it('flags in the lab’s zone', () => {
    // 6 May 23:30 EDT (7 May 03:30 UTC): inside the fever's window only on the lab's calendar
    const late = [{ id: 'late', collectedAt: new Date('2025-05-07T03:30:00Z') }];
    const fever = [{ id: 'fever', startDate: '2025-03-01' }];
    expect(flagCollections(fever, late, { timeZone: 'America/New_York' })[0]!.window!.events[0]!.windowDay).toBe(67);
    expect(flagCollections(fever, late)[0]!.window).toBeNull();
  });

  it('says when to re-evaluate while a window is open', () => {
    expect(reEvaluateFrom(events, {}, new Date('2025-03-15T12:00:00Z'))).toBe('2025-06-26');
    expect(reEvaluateFrom(events, {}, new Date('2025-07-01T12:00:00Z'))).toBeNull();
    expect(reEvaluateFrom(events, {}, new Date('2025-10-01T12:00:00Z'))).toBe('2025-11-07');
    expect(reEvaluateFrom([], {}, new Date('2025-10-01T12:00:00Z'))).toBeNull();
    // 25 June 23:30 in New York is 26 June in UTC: the window is still open in the lab
    expect(reEvaluateFrom(events, { timeZone: 'America/New_York' }, new Date('2025-06-26T03:30:00Z'))).toBe('2025-06-26');
    expect(reEvaluateFrom(events, {}, new Date('2025-06-26T03:30:00Z'))).toBeNull();
  });
});

describe('events lasting several days', () => {
  // A cell at the earliest stage on the illness's last day is still affected and reaches the
  // ejaculate spermatogenesis + transit later, so the window clears 67 days after the END date
  // (common practice: the 57-day cycle plus transit is counted from the end of the insult).
  it('clears 67 days after the last day, and counts its days from the first', () => {
    // 4 May to 6 May 2026: 6 May + 67 = 12 July (computed: 25 days to 31 May, 30 in June, 12 in July)
    const w = spermatogenicWindow('2026-05-04', {}, '2026-05-06');
    expect(w).toMatchObject({ startDate: '2026-05-04', endDate: '2026-05-06', lastDate: '2026-07-11', clearsDate: '2026-07-12', totalDays: 69, spermatogenicDays: 67 });
    expect(windowDay(w, '2026-05-04')).toBe(1);
    expect(windowDay(w, '2026-07-11')).toBe(69);
    expect(windowDay(w, '2026-07-12')).toBeNull();
    // without the end date the same fever would clear on 10 July (4 May + 67, computed)
    expect(spermatogenicWindow('2026-05-04').clearsDate).toBe('2026-07-10');
    // an end on the start date is a one-day event
    expect(spermatogenicWindow('2026-05-04', {}, '2026-05-04')).toMatchObject({ totalDays: 67, clearsDate: '2026-07-10' });
  });

  it('takes the end as a lab date too, across a clock change', () => {
    // Berlin, 28 Mar to 31 Mar 2025 (summer time starts 30 Mar): 31 Mar + 67 = 6 June (computed: 30 in April, 31 in May, 6)
    const w = spermatogenicWindow('2025-03-28', { timeZone: 'Europe/Berlin' }, new Date('2025-03-31T21:30:00Z')); // 23:30 CEST on 31 Mar
    expect(w.endDate).toBe('2025-03-31');
    expect(w.clearsDate).toBe('2025-06-06');
    expect(iso(w.clears)).toBe('2025-06-05T22:00:00.000Z');
  });

  it('refuses an end before the start', () => {
    expect(() => spermatogenicWindow('2026-05-04', {}, '2026-05-03')).toThrow(/before it starts/);
  });

  it('extends the merged stretch and the flags', () => {
    const events = [
      { id: 'illness', startDate: '2025-03-01', endDate: '2025-03-20' },
      { id: 'fever', startDate: '2025-05-20' },
    ];
    // 20 March + 67 days: 11 days to 31 March, 30 in April, 26 in May → 26 May
    expect(eventWindows(events)[0]).toMatchObject({ clearsDate: '2025-05-26', totalDays: 86 });
    // the fever starts before the illness's window clears: one stretch to 20 May + 67 = 26 July (computed: 11 + 30 + 26)
    expect(mergeWindows(eventWindows(events)).map((m) => [m.startDate, m.clearsDate, m.eventIds])).toEqual([['2025-03-01', '2025-07-26', ['illness', 'fever']]]);
    const r = flagCollections(events, [{ id: 'c', collectedAt: '2025-05-22' }]);
    // 22 May: day 83 of the illness's window (31 + 30 + 22 = 83, computed) and day 3 of the fever's
    expect(r[0]!.window!.events.map((e) => [e.eventId, e.windowDay])).toEqual([['illness', 83], ['fever', 3]]);
    expect(classifyCollections('2025-03-01', [{ id: 'x', collectedAt: '2025-05-25' }], {}, '2025-03-20')[0]).toMatchObject({ position: 'inside', windowDay: 86 });
  });
});
