import { describe, expect, it } from 'vitest';
import { energySamplesFrom } from './energy-samples';
import { monthlyEnergy } from './monthly-energy';

const hydro = { kind: 'hydro' as const, ratedKw: 50, designHeadM: 10, efficiency: 0.8 };

describe('monthlyEnergy', () => {
  it('gives no months for no samples', () => {
    expect(monthlyEnergy(energySamplesFrom(hydro, []).samples, { ratedKw: 50 })).toEqual([]);
  });

  it('lists a month between samples with coverage 0 and no energy', () => {
    const list = [
      { ts: Date.UTC(2026, 0, 31, 23, 50), kw: 10 },
      { ts: Date.UTC(2026, 0, 31, 23, 55), kw: 10 },
      { ts: Date.UTC(2026, 2, 1, 0, 0), kw: 10 },
      { ts: Date.UTC(2026, 2, 1, 0, 10), kw: 10 },
    ];
    const months = monthlyEnergy(energySamplesFrom(hydro, list).samples, { ratedKw: 50 });
    expect(months.map((m) => m.month)).toEqual(['2026-01', '2026-02', '2026-03']);
    expect(months[0]?.kwh).toBeCloseTo(10 * (5 / 60), 12);
    expect(months[1]?.kwh).toBeUndefined();
    expect(months[1]?.coveragePct).toBe(0);
    expect(months[1]?.totals.periodHours).toBe(672);
    expect(months[2]?.kwh).toBeCloseTo(10 * (10 / 60), 12);
  });

  it('splits an interval across the month edge of the zone asked for', () => {
    // 21:55 to 22:05 UTC on 31 March 2026 (23:55 to 00:05 in Oslo, on summer time +02:00 since 29 March):
    // Oslo's midnight falls at 22:00 UTC, so 5 minutes at 12 kW (1 kWh) go to March and 5 to April there;
    // in UTC all 10 minutes are March's.
    const list = [
      { ts: Date.UTC(2026, 2, 31, 21, 55), kw: 12 },
      { ts: Date.UTC(2026, 2, 31, 22, 5), kw: 12 },
    ];
    const { samples } = energySamplesFrom(hydro, list);
    const utc = monthlyEnergy(samples, { ratedKw: 50 });
    expect(utc.map((m) => m.month)).toEqual(['2026-03']);
    expect(utc[0]?.kwh).toBeCloseTo(2, 12);
    const oslo = monthlyEnergy(samples, { ratedKw: 50, timeZone: 'Europe/Oslo' });
    expect(oslo.map((m) => m.month)).toEqual(['2026-03', '2026-04']);
    expect(oslo[0]?.kwh).toBeCloseTo(1, 12);
    expect(oslo[1]?.kwh).toBeCloseTo(1, 12);
    expect(oslo[0]?.startMs).toBe(Date.UTC(2026, 1, 28, 23));
  });
});
