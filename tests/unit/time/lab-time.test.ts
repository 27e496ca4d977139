import { describe, expect, it } from 'vitest';
import { dateToWallTime, isTimeZone, labDay, labDayKey, labYear, timeZoneNames, wallTimeToDate } from '@/lib/time/lab-time';

// Check values: summer time in the EU starts on the last Sunday of March and ends on the last
// Sunday of October, both at 01:00 UTC (Directive 2000/84/EC of the European Parliament and of the
// Council, 19 January 2001, on summer-time arrangements, art. 2 and 3). In the United States it runs
// from the second Sunday of March, 02:00 local, to the first Sunday of November, 02:00 local
// (Energy Policy Act of 2005, sec. 110). In 2026 those Sundays are 29 March / 25 October and
// 8 March / 1 November (calendar). Offsets: London GMT+0 / BST+1, New York EST−5 / EDT−4.
const iso = (d: Date | null) => d?.toISOString() ?? null;

describe('lab clock', () => {
  it('reads a wall-clock time in the lab zone', () => {
    expect(iso(wallTimeToDate('2026-06-10T10:25', 'Europe/London'))).toBe('2026-06-10T09:25:00.000Z'); // BST, UTC+1
    expect(iso(wallTimeToDate('2026-01-10T10:25', 'Europe/London'))).toBe('2026-01-10T10:25:00.000Z'); // GMT
    expect(iso(wallTimeToDate('2026-06-10T19:30', 'America/New_York'))).toBe('2026-06-10T23:30:00.000Z'); // EDT, UTC−4
    expect(iso(wallTimeToDate('2026-06-10T10:25', 'UTC'))).toBe('2026-06-10T10:25:00.000Z');
  });

  it('moves a time skipped by the spring change forward, and takes the first of a repeated hour', () => {
    // London, 29 March 2026: 01:00 GMT becomes 02:00 BST, so 01:30 does not happen; 02:30 BST = 01:30 UTC.
    expect(iso(wallTimeToDate('2026-03-29T01:30', 'Europe/London'))).toBe('2026-03-29T01:30:00.000Z');
    // New York, 1 November 2026: 01:30 happens in EDT (05:30 UTC) and again in EST (06:30 UTC).
    expect(iso(wallTimeToDate('2026-11-01T01:30', 'America/New_York'))).toBe('2026-11-01T05:30:00.000Z');
  });

  it('refuses text that is not a wall-clock time', () => {
    for (const bad of ['', '2026-06-10', '2026-13-01T10:00', '2026-06-10T24:00', '2026-06-10T10:60', 'yesterday']) {
      expect(wallTimeToDate(bad, 'UTC'), bad).toBeNull();
    }
  });

  it('writes an instant back as the lab’s wall clock', () => {
    expect(dateToWallTime('2026-06-10T23:30:00.000Z', 'America/New_York')).toBe('2026-06-10T19:30');
    expect(dateToWallTime(new Date('2026-06-10T09:25:00Z'), 'Europe/London')).toBe('2026-06-10T10:25');
    expect(labDayKey(new Date('2026-06-11T00:30:00Z'), 'America/New_York')).toBe('2026-06-10');
    expect(labDayKey(new Date('2026-06-11T00:30:00Z'), 'UTC')).toBe('2026-06-11');
  });

  it('agrees with the runtime’s own Intl time-zone data (an independent implementation) across a year', () => {
    const parts = (t: number, tz: string) => {
      const p = Object.fromEntries(
        new Intl.DateTimeFormat('en-CA', { timeZone: tz, year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' })
          .formatToParts(new Date(t))
          .map((x) => [x.type, x.value]),
      );
      return `${p.year}-${p.month}-${p.day}T${p.hour}:${p.minute}`;
    };
    for (const tz of ['Europe/London', 'America/New_York', 'Australia/Sydney', 'Asia/Kolkata', 'UTC']) {
      for (let t = Date.UTC(2026, 0, 1, 0, 7); t < Date.UTC(2027, 0, 1); t += 37 * 3_600_000 + 11 * 60_000) {
        const wall = parts(t, tz);
        expect(dateToWallTime(new Date(t), tz)).toBe(wall);
        // Every wall time that happens once maps back to its instant.
        const back = wallTimeToDate(wall, tz)!;
        expect(parts(back.getTime(), tz)).toBe(wall);
      }
    }
  });

  it('gives the lab day, 23 or 25 hours long across a clock change', () => {
    const spring = labDay(new Date('2026-03-08T15:00:00Z'), 'America/New_York');
    expect([iso(spring.start), iso(spring.end)]).toEqual(['2026-03-08T05:00:00.000Z', '2026-03-09T04:00:00.000Z']);
    const autumn = labDay(new Date('2026-10-25T12:00:00Z'), 'Europe/London');
    expect((autumn.end.getTime() - autumn.start.getTime()) / 3_600_000).toBe(25);
  });

  it('knows time-zone names', () => {
    expect(isTimeZone('Europe/London')).toBe(true);
    expect(isTimeZone('UTC')).toBe(true);
    expect(isTimeZone('Mars/Olympus_Mons')).toBe(false);
    expect(isTimeZone('')).toBe(false);
    expect(timeZoneNames()[0]).toBe('UTC');
    expect(timeZoneNames()).toContain('America/New_York');
  });

  it('gives the lab’s calendar year of an instant (the dashboard’s season)', () => {
    // 31 Dec 2026, 20:00 in New York (EST, UTC−5) is already 1 Jan 2027 01:00 UTC.
    const ny = labYear(new Date('2027-01-01T01:00:00Z'), 'America/New_York');
    expect(ny.year).toBe(2026);
    expect([iso(ny.start), iso(ny.end)]).toEqual(['2026-01-01T05:00:00.000Z', '2027-01-01T05:00:00.000Z']);
    // London is on GMT at new year: the year starts at midnight UTC.
    const london = labYear(new Date('2026-07-15T12:00:00Z'), 'Europe/London');
    expect([london.year, iso(london.start), iso(london.end)]).toEqual([2026, '2026-01-01T00:00:00.000Z', '2027-01-01T00:00:00.000Z']);
    expect(labYear(new Date('2026-12-31T23:59:59Z'), 'UTC').year).toBe(2026);
  });
});
