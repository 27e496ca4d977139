import { describe, expect, it } from 'vitest';
import {
  DEMO_BSE,
  DEMO_CLIENT_USER_EMAIL,
  DEMO_DSO_RUN,
  DEMO_FEVER,
  DEMO_RECORDERS,
  DEMO_SEASON,
  buildDemoScenario,
  expectedAbnormalShare,
  type DemoCollection,
} from '@/lib/demo/scenario';
import { DEMO_USERS } from '@/lib/demo/users';
import { pickSecondEjaculate } from '@/lib/semen/arithmetic';
import {
  ellipsoidVolumeMl,
  estimateActualDso,
  predictedDailySpermOutputBillion,
  totalTesticularVolume,
} from '@/lib/semen/testis';

const DAY_MS = 86_400_000;
const HOUR_MS = 3_600_000;
const scenario = buildDemoScenario();
const { collections, stallions, clients, testisMeasurements } = scenario;

const byStallion = (key: string) =>
  collections.filter((c) => c.stallionKey === key).sort((a, b) => a.collectedAt.getTime() - b.collectedAt.getTime());
const day = (d: Date) => d.toISOString().slice(0, 10);
const daysAfterFever = (c: DemoCollection) =>
  Math.floor(c.collectedAt.getTime() / DAY_MS) - Date.parse(`${DEMO_FEVER.date}T00:00:00Z`) / DAY_MS;
const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / xs.length;
const decimals = (x: number) => (String(x).split('.')[1] ?? '').length;

describe('demo scenario', () => {
  it('is the same on every call, and depends on the seed', () => {
    expect(buildDemoScenario()).toEqual(buildDemoScenario());
    const other = buildDemoScenario(1);
    expect(other.collections.map((c) => c.volumeMl)).not.toEqual(collections.map((c) => c.volumeMl));
  });

  it('has 4–5 clients with one referring vet, invented e-mails and unique names', () => {
    expect(clients.length).toBeGreaterThanOrEqual(4);
    expect(clients.length).toBeLessThanOrEqual(5);
    expect(clients.filter((c) => c.kind === 'referring_vet')).toHaveLength(1);
    expect(new Set(clients.map((c) => c.name)).size).toBe(clients.length);
    for (const c of clients) expect(c.email).toMatch(/@[a-z0-9.-]+\.example$/);
  });

  it('gives Corwen Ashdale, the client user, exactly 2 stallions', () => {
    const corwen = clients.find((c) => c.email === DEMO_CLIENT_USER_EMAIL);
    expect(corwen?.name).toBe('Corwen Ashdale');
    expect(corwen?.kind).toBe('owner');
    const user = DEMO_USERS.find((u) => u.email === DEMO_CLIENT_USER_EMAIL);
    expect(user).toMatchObject({ name: 'Corwen Ashdale', role: 'client' });
    expect(stallions.filter((s) => s.clientName === 'Corwen Ashdale')).toHaveLength(2);
  });

  it('records with demo users of the right roles', () => {
    expect(DEMO_USERS.find((u) => u.email === DEMO_RECORDERS.collections)?.role).toBe('technician');
    expect(DEMO_USERS.find((u) => u.email === DEMO_RECORDERS.testis)?.role).toBe('veterinarian');
  });

  it('has 5 stallions with unique fictional microchip-style numbers and known clients', () => {
    expect(stallions).toHaveLength(5);
    expect(new Set(stallions.map((s) => s.registration)).size).toBe(5);
    expect(new Set(stallions.map((s) => s.name)).size).toBe(5);
    const clientNames = new Set(clients.map((c) => c.name));
    for (const s of stallions) {
      expect(s.registration).toMatch(/^956000000\d{6}$/);
      expect(clientNames.has(s.clientName)).toBe(true);
      expect(s.foalingYear).toBeGreaterThanOrEqual(2000);
      expect(s.foalingYear).toBeLessThanOrEqual(2023);
      expect(collections.filter((c) => c.stallionKey === s.key).length).toBeGreaterThan(30);
    }
  });

  it('keeps every semen value in its plausible range, rounded, with progressive ≤ total', () => {
    // Ranges: plausible stallion ejaculates (from memory / common practice).
    for (const c of collections) {
      expect(c.volumeMl).toBeGreaterThanOrEqual(30);
      expect(c.volumeMl).toBeLessThanOrEqual(90);
      expect(decimals(c.volumeMl)).toBeLessThanOrEqual(1);
      expect(c.concentrationMPerMl).toBeGreaterThanOrEqual(80);
      expect(c.concentrationMPerMl).toBeLessThanOrEqual(300);
      expect(Number.isInteger(c.concentrationMPerMl)).toBe(true);
      expect(c.totalMotilityPct).toBeGreaterThanOrEqual(60);
      expect(c.totalMotilityPct).toBeLessThanOrEqual(85);
      expect(c.progressiveMotilityPct).toBeGreaterThanOrEqual(45);
      expect(c.progressiveMotilityPct).toBeLessThanOrEqual(75);
      expect(Number.isInteger(c.totalMotilityPct) && Number.isInteger(c.progressiveMotilityPct)).toBe(true);
      expect(c.progressiveMotilityPct).toBeLessThanOrEqual(c.totalMotilityPct);
      expect(c.magnification).toBe(1000);
      expect([
        ['eosin_nigrosin', 'bright_field'],
        ['fixed_wet_mount', 'dic'],
      ]).toContainEqual([c.preparation, c.optics]);
      expect(c.collectedBy.length).toBeGreaterThan(0);
    }
    // Values scatter inside the ranges rather than pile up at their limits.
    const atLimit = collections.filter(
      (c) => [30, 90].includes(c.volumeMl) || [80, 300].includes(c.concentrationMPerMl) || [45, 75].includes(c.progressiveMotilityPct),
    );
    expect(atLimit.length).toBeLessThan(collections.length * 0.05);
    const wet = collections.filter((c) => c.preparation === 'fixed_wet_mount').length;
    expect(wet).toBeGreaterThan(0);
    expect(wet).toBeLessThan(collections.length / 3);
  });

  it('collects in the season, 08:00–11:00 UTC, never after 2026-12-01', () => {
    const limit = Date.parse('2026-12-01T00:00:00Z');
    for (const c of collections) {
      expect(day(c.collectedAt) >= DEMO_SEASON.start && day(c.collectedAt) <= DEMO_SEASON.end).toBe(true);
      const minutes = c.collectedAt.getUTCHours() * 60 + c.collectedAt.getUTCMinutes();
      expect(minutes).toBeGreaterThanOrEqual(8 * 60);
      expect(minutes).toBeLessThanOrEqual(11 * 60);
      expect(c.collectedAt.getTime()).toBeLessThan(limit);
    }
    for (const t of testisMeasurements) expect(Date.parse(`${t.measuredOn}T00:00:00Z`)).toBeLessThan(limit);
  });

  it('numbers collections within a UTC day 1, 2 and keys them uniquely', () => {
    expect(new Set(collections.map((c) => c.key)).size).toBe(collections.length);
    for (const s of stallions) {
      const seen = new Map<string, number>();
      for (const c of byStallion(s.key)) {
        const n = (seen.get(day(c.collectedAt)) ?? 0) + 1;
        seen.set(day(c.collectedAt), n);
        expect(c.numberThatDay).toBe(n);
      }
    }
  });

  it('spaces collections 2–4 days apart, except the planned pairs, daily run and rests', () => {
    for (const s of stallions) {
      const cs = byStallion(s.key);
      const gaps = cs.slice(1).map((c, i) => (c.collectedAt.getTime() - cs[i].collectedAt.getTime()) / HOUR_MS);
      for (const h of gaps) {
        const pair = h === 1;
        const daily = h === 24 && s.key === DEMO_DSO_RUN.stallionKey;
        // Regular: 2–4 days at times between 08:00 and 11:00 → 45–99 h; rests up to 12 days.
        expect(pair || daily || (h >= 45 && h <= 12 * 24 + 3)).toBe(true);
      }
      expect(gaps.filter((h) => h >= 45 && h <= 99).length).toBeGreaterThan(gaps.length * 0.7);
    }
  });

  it('has two breeding-soundness pairs 60 min apart after a week without collection', () => {
    expect(DEMO_BSE).toHaveLength(2);
    expect(new Set(DEMO_BSE.map((b) => b.stallionKey)).size).toBe(2);
    for (const bse of DEMO_BSE) {
      const cs = byStallion(bse.stallionKey);
      const that = cs.filter((c) => day(c.collectedAt) === bse.date);
      expect(that.map((c) => c.numberThatDay)).toEqual([1, 2]);
      expect((that[1].collectedAt.getTime() - that[0].collectedAt.getTime()) / 60_000).toBe(60);
      const before = cs.filter((c) => c.collectedAt < that[0].collectedAt).at(-1);
      if (before) expect((that[0].collectedAt.getTime() - before.collectedAt.getTime()) / DAY_MS).toBeGreaterThanOrEqual(7);
      // The second ejaculate carries fewer sperm than the first (common practice).
      expect(that[1].volumeMl * that[1].concentrationMPerMl).toBeLessThan(that[0].volumeMl * that[0].concentrationMPerMl);
      // The pair is what lib/semen finds as "second of two ejaculates about an hour apart".
      const pick = pickSecondEjaculate(cs.map((c) => ({ id: c.key, collectedAt: c.collectedAt, pmmnBillion: null })));
      expect(pick.pairs).toHaveLength(1);
      expect(pick.second?.id).toBe(that[1].key);
    }
    const others = stallions.filter((s) => !DEMO_BSE.some((b) => b.stallionKey === s.key));
    for (const s of others) expect(byStallion(s.key).every((c) => c.numberThatDay === 1)).toBe(true);
  });

  it('has a daily run of 8+ collections 24 h apart that gives an actual DSO near the predicted one', () => {
    const cs = byStallion(DEMO_DSO_RUN.stallionKey);
    let longest = 1;
    let run = 1;
    for (let i = 1; i < cs.length; i++) {
      run = cs[i].collectedAt.getTime() - cs[i - 1].collectedAt.getTime() === DAY_MS ? run + 1 : 1;
      longest = Math.max(longest, run);
    }
    expect(longest).toBeGreaterThanOrEqual(8);
    expect(longest).toBe(DEMO_DSO_RUN.days);

    // 10 daily collections, 7 prior needed → collections 8, 9, 10 count (computed from estimateActualDso's rule).
    const est = estimateActualDso(
      cs.map((c) => ({ id: c.key, collectedAt: c.collectedAt, totalSpermBillion: (c.volumeMl * c.concentrationMPerMl) / 1000 })),
    );
    expect(est.usedIds).toHaveLength(3);
    const t = testisMeasurements.find((m) => m.stallionKey === DEMO_DSO_RUN.stallionKey && m.measuredOn === DEMO_DSO_RUN.start);
    expect(t).toBeDefined();
    const volume = totalTesticularVolume(
      ellipsoidVolumeMl(t!.leftLengthCm, t!.leftWidthCm, t!.leftHeightCm),
      ellipsoidVolumeMl(t!.rightLengthCm, t!.rightWidthCm, t!.rightHeightCm),
    );
    const predicted = predictedDailySpermOutputBillion(volume).billionPerDay;
    // A normal stallion's actual DSO sits near the Love et al. 1991 prediction; the demo aims at 70–110 %.
    expect(est.dsoBillion! / predicted).toBeGreaterThan(0.7);
    expect(est.dsoBillion! / predicted).toBeLessThan(1.1);
  });

  it('notes the fever once, on the first collection after it', () => {
    const cs = byStallion(DEMO_FEVER.stallionKey);
    const noted = cs.filter((c) => c.remarks === DEMO_FEVER.remark);
    expect(noted).toHaveLength(1);
    expect(noted[0]).toBe(cs.find((c) => day(c.collectedAt) >= DEMO_FEVER.date));
    expect(DEMO_FEVER.remark).toBe('Fever 39.8 °C on 4 May, treated by the attending vet');
    expect(collections.filter((c) => c.remarks === DEMO_FEVER.remark)).toHaveLength(1);
  });

  it('lowers the fever stallion’s progressive motility between day 9 and day 67', () => {
    const cs = byStallion(DEMO_FEVER.stallionKey);
    const inside = cs.filter((c) => daysAfterFever(c) >= 9 && daysAfterFever(c) <= 67);
    const outside = cs.filter((c) => daysAfterFever(c) < 9 || daysAfterFever(c) > 67);
    const after = cs.filter((c) => daysAfterFever(c) > 67);
    expect(inside.length).toBeGreaterThan(10);
    expect(after.length).toBeGreaterThan(3);
    const pmIn = mean(inside.map((c) => c.progressiveMotilityPct));
    const pmOut = mean(outside.map((c) => c.progressiveMotilityPct));
    expect(pmIn).toBeLessThan(pmOut - 5);
    // Recovered after the window: within 4 points of the pre-fever mean.
    const pmBefore = mean(cs.filter((c) => daysAfterFever(c) < 0).map((c) => c.progressiveMotilityPct));
    expect(Math.abs(mean(after.map((c) => c.progressiveMotilityPct)) - pmBefore)).toBeLessThan(4);
  });

  it('gives each collection an expected abnormal share: baseline 20–30 %, up to ~55 % after the fever', () => {
    for (const c of collections) {
      const share = expectedAbnormalShare(c.stallionRegistration, c.collectedAt);
      const d = daysAfterFever(c);
      if (c.stallionKey !== DEMO_FEVER.stallionKey || d < 9 || d > 67) {
        expect(share).toBeGreaterThanOrEqual(0.2);
        expect(share).toBeLessThanOrEqual(0.3);
      } else {
        expect(share).toBeLessThanOrEqual(0.55);
      }
    }
    const fever = byStallion(DEMO_FEVER.stallionKey).map((c) => expectedAbnormalShare(c.stallionRegistration, c.collectedAt));
    expect(Math.max(...fever)).toBeCloseTo(0.55, 2);
    const reg = DEMO_FEVER.stallionRegistration;
    // Baseline before, peak mid-window, baseline again after day 67.
    expect(expectedAbnormalShare(reg, new Date('2026-05-01T09:00:00Z'))).toBe(0.24);
    expect(expectedAbnormalShare(reg, new Date('2026-06-15T09:00:00Z'))).toBe(0.55); // day 42
    expect(expectedAbnormalShare(reg, new Date('2026-07-20T09:00:00Z'))).toBe(0.24); // day 77
    expect(() => expectedAbnormalShare('999', new Date())).toThrow(RangeError);
  });

  it('measures each stallion’s testes on 1–2 days, within plausible sizes', () => {
    for (const s of stallions) {
      const ms = testisMeasurements.filter((m) => m.stallionKey === s.key);
      expect(ms.length).toBeGreaterThanOrEqual(1);
      expect(ms.length).toBeLessThanOrEqual(2);
      expect(new Set(ms.map((m) => m.measuredOn)).size).toBe(ms.length);
    }
    // Ranges: mature stallion testes and scrotal width (from memory; width ≥ 8 cm, Asbury 1988).
    for (const m of testisMeasurements) {
      expect(['caliper', 'ultrasound']).toContain(m.method);
      for (const l of [m.leftLengthCm, m.rightLengthCm]) expect(l >= 8 && l <= 12).toBe(true);
      for (const w of [m.leftWidthCm, m.rightWidthCm]) expect(w >= 5 && w <= 7).toBe(true);
      for (const h of [m.leftHeightCm, m.rightHeightCm]) expect(h >= 5 && h <= 7.5).toBe(true);
      expect(m.totalWidthCm >= 8.5 && m.totalWidthCm <= 11).toBe(true);
      expect(decimals(m.leftLengthCm)).toBeLessThanOrEqual(1);
      expect(m.measuredOn).toMatch(/^2026-\d{2}-\d{2}$/);
    }
  });
});
