/**
 * Calendar months in a time zone against the laws that set daylight-saving
 * time, and against luxon (a general-purpose date library from the npm
 * registry) as an independent reader of the zone database.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { DateTime } from 'luxon';
import { monthBuckets, monthHours, monthStartMs } from '@/lib/energy/calendar-buckets';
import { energySamplesFrom } from '@/lib/energy/energy-samples';
import { monthlyEnergy } from '@/lib/energy/monthly-energy';

const H = 3_600_000;

describe('month lengths across daylight-saving changes', () => {
  it('Europe: 743 h in March, 745 h in October', () => {
    // Directive 2000/84/EC, articles 2 and 3 (from memory): summer time begins at 01:00 UTC on the last
    // Sunday in March and ends at 01:00 UTC on the last Sunday in October (29 March and 25 October 2026).
    // Norway follows the directive through the EEA agreement (from memory); the zone database agrees.
    for (const zone of ['Europe/Oslo', 'Europe/Lisbon', 'Europe/Helsinki']) {
      expect(monthHours(2026, 3, zone)).toBe(743);
      expect(monthHours(2026, 10, zone)).toBe(745);
      expect(monthHours(2026, 7, zone)).toBe(744);
      expect(monthHours(2026, 2, zone)).toBe(672);
    }
    // The change happens at one UTC instant in every EU zone.
    expect(monthStartMs(2026, 4, 'Europe/Oslo')).toBe(Date.UTC(2026, 2, 31, 22));
  });

  it('United States: 743 h in March, 721 h in November', () => {
    // Energy Policy Act of 2005, section 110 (15 U.S.C. 260a; from memory): daylight time from 2:00 local on the
    // second Sunday of March to 2:00 local on the first Sunday of November (8 March, 1 November 2026).
    expect(monthHours(2026, 3, 'America/New_York')).toBe(743);
    expect(monthHours(2026, 11, 'America/New_York')).toBe(721);
    expect(monthHours(2026, 11, 'America/Denver')).toBe(721);
  });

  it('New South Wales: 721 h in April, 743 h in October', () => {
    // Standard Time Act 1987 (NSW) as amended in 2007 (from memory): daylight saving from 2:00 on the
    // first Sunday in October to 3:00 on the first Sunday in April (5 April and 4 October 2026).
    expect(monthHours(2026, 4, 'Australia/Sydney')).toBe(721);
    expect(monthHours(2026, 10, 'Australia/Sydney')).toBe(743);
  });

  it('Cuba: where midnight on the 1st happens twice, the month starts at the first', () => {
    // Cuba ends summer time on the first Sunday of November at 01:00, back to 00:00 (from memory;
    // the zone database agrees): on 1 November 2026 the clock reads 00:00 at 04:00 UTC and again at
    // 05:00 UTC. Both hours read 1 November, so both belong to November, which has 721 h.
    expect(monthStartMs(2026, 11, 'America/Havana')).toBe(Date.UTC(2026, 10, 1, 4));
    expect(monthHours(2026, 11, 'America/Havana')).toBe(721);
    expect(monthHours(2026, 10, 'America/Havana')).toBe(744);
  });

  it('UTC months have whole days only', () => {
    // Gregorian calendar rule: 28, 29 (leap year: divisible by 4, centuries only when divisible by 400),
    // 30 or 31 days (common knowledge, no document checked).
    expect(monthHours(2024, 2)).toBe(29 * 24);
    expect(monthHours(2100, 2)).toBe(28 * 24);
    expect(monthHours(2000, 2)).toBe(29 * 24);
  });

  it('constant power P over a fully covered March in Oslo gives P × 743 h', () => {
    // 743 h from the directive above; 7.5 kW × 743 h, and 7.5 of 20 kW is 37.5 % (arithmetic by hand).
    const hydro = { kind: 'hydro' as const, ratedKw: 20, designHeadM: 10, efficiency: 0.8 };
    const from = monthStartMs(2026, 3, 'Europe/Oslo');
    const to = monthStartMs(2026, 4, 'Europe/Oslo');
    const list = [];
    for (let t = from; t <= to; t += 10 * 60_000) list.push({ ts: t, kw: 7.5 });
    const [march] = monthlyEnergy(energySamplesFrom(hydro, list).samples, { ratedKw: 20, timeZone: 'Europe/Oslo' });
    expect(march?.month).toBe('2026-03');
    expect(march?.coveragePct).toBe(100);
    expect(march?.kwh).toBeCloseTo(7.5 * 743, 9);
    expect(march?.capacityFactorPct).toBeCloseTo(37.5, 9);
  });
});

const ZONES = [
  'UTC',
  'Europe/Oslo',
  'Europe/London',
  'America/New_York',
  'America/Sao_Paulo', // summer time began at local midnight until 2018
  'America/Havana', // summer time ends at local 01:00 -> 00:00: midnight on 1 November can happen twice
  'America/Santiago',
  'Asia/Tehran',
  'Asia/Kathmandu',
  'Australia/Lord_Howe', // half-hour change
  'Pacific/Chatham',
  'Africa/Cairo',
];

/**
 * First instant of a local month as luxon reads it. Where local midnight happens twice luxon
 * resolves it to the later instant, yet the hour before already reads the 1st: step back to it.
 */
function luxonMonthStart(year: number, month: number, zone: string): number {
  const first = month === 13 ? DateTime.fromObject({ year: year + 1, month: 1, day: 1 }, { zone }) : DateTime.fromObject({ year, month, day: 1 }, { zone });
  let t = first.toMillis();
  for (const stepMin of [60, 30]) {
    const earlier = DateTime.fromMillis(t - stepMin * 60_000, { zone });
    if (earlier.year === first.year && earlier.month === first.month && earlier.day === 1 && earlier.hour === 0) t -= stepMin * 60_000;
  }
  return t;
}

describe('month starts against luxon', () => {
  it('each month starts at the first instant whose local date is the 1st', () => {
    fc.assert(
      fc.property(fc.integer({ min: 2000, max: 2037 }), fc.integer({ min: 1, max: 12 }), fc.constantFrom(...ZONES), (year, month, zone) => {
        const start = monthStartMs(year, month, zone);
        const at = DateTime.fromMillis(start, { zone });
        const before = DateTime.fromMillis(start - 1, { zone });
        expect([at.year, at.month, at.day]).toEqual([year, month, 1]);
        // Local midnight, or the hour the clock jumps to where midnight is skipped.
        expect(at.minute).toBe(0);
        expect(at.hour === 0 || (at.hour === 1 && before.offset < at.offset)).toBe(true);
        expect(before.day === 1 && before.month === month).toBe(false);
        // luxon's own reading of local midnight agrees, except where midnight happens twice:
        // there it takes the later instant, and the month starts at the earlier one.
        const theirs = DateTime.fromObject({ year, month, day: 1 }, { zone }).toMillis();
        if (theirs !== start) {
          expect(theirs).toBeGreaterThan(start);
          const t = DateTime.fromMillis(theirs, { zone });
          expect([t.day, t.hour, t.minute]).toEqual([1, 0, 0]);
        }
      }),
      { numRuns: 600 },
    );
  });

  it('month lengths agree with luxon over 38 years in every test zone', () => {
    for (const zone of ZONES) {
      const { edgesMs, labels } = monthBuckets(Date.UTC(2000, 0, 15), Date.UTC(2037, 11, 15), zone);
      labels.forEach((label, k) => {
        const [y, m] = label.split('-').map(Number) as [number, number];
        const start = DateTime.fromMillis(edgesMs[k] as number, { zone });
        const next = start.plus({ months: 1 }).startOf('month');
        expect([start.year, start.month]).toEqual([y, m]);
        expect((edgesMs[k + 1] as number) - (edgesMs[k] as number)).toBe(next.toMillis() - start.toMillis());
      });
    }
  });

  it('constant power over any fully covered month gives P × the month’s hours', () => {
    const hydro = { kind: 'hydro' as const, ratedKw: 100, designHeadM: 10, efficiency: 0.8 };
    fc.assert(
      fc.property(
        fc.integer({ min: 2001, max: 2035 }),
        fc.integer({ min: 1, max: 12 }),
        fc.constantFrom(...ZONES),
        fc.double({ min: 0, max: 100, noNaN: true }),
        fc.integer({ min: 2, max: 10 }),
        (year, month, zone, kw, stepMin) => {
          const hours = (luxonMonthStart(year, month + 1, zone) - luxonMonthStart(year, month, zone)) / H;
          const list = [];
          // Sample on the whole minute grid, starting a step early so the edges fall inside intervals.
          const step = stepMin * 60_000;
          const end = monthStartMs(year, month + 1, zone) + step;
          for (let t = monthStartMs(year, month, zone) - step; t <= end; t += step) list.push({ ts: t, kw });
          const months = monthlyEnergy(energySamplesFrom(hydro, list).samples, { ratedKw: 100, timeZone: zone });
          const m = months.find((x) => x.month === `${year}-${String(month).padStart(2, '0')}`);
          expect(m?.totals.periodHours).toBeCloseTo(hours, 9);
          expect(m?.coveragePct).toBe(100);
          expect(m?.kwh).toBeCloseTo(kw * hours, 6);
        },
      ),
      { numRuns: 40 },
    );
  });
});

describe('months of one log in two zones', () => {
  it('a New Year’s hour in Oslo is December’s in UTC', () => {
    // 23:00–23:50 UTC on 31 December 2025 is 00:00–00:50 on 1 January 2026 in Oslo, which keeps UTC+01:00
    // in winter (Norwegian standard time; from memory, and the zone database agrees).
    const list = [];
    for (let t = Date.UTC(2025, 11, 31, 23); t <= Date.UTC(2025, 11, 31, 23, 50); t += 10 * 60_000) list.push({ ts: t, kw: 6 });
    const { samples } = energySamplesFrom({ kind: 'hydro', ratedKw: 10, designHeadM: 5, efficiency: 0.7 }, list);
    expect(monthlyEnergy(samples, { ratedKw: 10 }).map((m) => m.month)).toEqual(['2025-12']);
    expect(monthlyEnergy(samples, { ratedKw: 10, timeZone: 'Europe/Oslo' }).map((m) => m.month)).toEqual(['2026-01']);
  });
});
