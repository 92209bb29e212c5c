/**
 * Energy integration against the composite trapezoidal rule's textbook
 * worked examples, and the gap and month-splitting rules of the data
 * contract (section 5).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { integrateIntoBuckets } from '@/lib/energy/integrate';
import { energySamplesFrom } from '@/lib/energy/energy-samples';
import { monthlyEnergy } from '@/lib/energy/monthly-energy';

const MIN = 60_000;
/** One unit of the textbook's x axis is 10 minutes here, so its areas are kW·(10 min) = kWh · 1/6. */
const UNIT_MS = 10 * MIN;
const KWH_PER_UNIT_AREA = 10 / 60;

/** Samples f(x) at x = a, a + h, …, b on the 10-minute scale. */
function sampled(f: (x: number) => number, a: number, b: number, n: number) {
  const tsMs: number[] = [];
  const values: number[] = [];
  for (let i = 0; i <= n; i++) {
    const x = a + ((b - a) * i) / n;
    tsMs.push(Math.round(x * UNIT_MS));
    values.push(f(x));
  }
  return { tsMs, values };
}

const chapra = (x: number) => 0.2 + 25 * x - 200 * x ** 2 + 675 * x ** 3 - 900 * x ** 4 + 400 * x ** 5;

describe('composite trapezoidal rule, textbook worked examples', () => {
  it('single and composite trapezoid of a polynomial on [0, 0.8]', () => {
    // Chapra & Canale, Numerical Methods for Engineers, examples of the trapezoidal rule (from memory):
    // f(x) = 0.2 + 25x − 200x² + 675x³ − 900x⁴ + 400x⁵ on [0, 0.8]; one segment 0.1728,
    // two segments 1.0688, four segments 1.4848 (exact integral 1.640533).
    const edges = [0, 0.8 * UNIT_MS];
    expect(integrateIntoBuckets(sampled(chapra, 0, 0.8, 1), edges).valueHours[0]).toBeCloseTo(0.1728 * KWH_PER_UNIT_AREA, 12);
    expect(integrateIntoBuckets(sampled(chapra, 0, 0.8, 2), edges).valueHours[0]).toBeCloseTo(1.0688 * KWH_PER_UNIT_AREA, 12);
    expect(integrateIntoBuckets(sampled(chapra, 0, 0.8, 4), edges).valueHours[0]).toBeCloseTo(1.4848 * KWH_PER_UNIT_AREA, 12);
  });

  it('x² on [0, 1] with four segments gives 0.34375', () => {
    // Standard numerical-methods exercise (e.g. Burden & Faires, Numerical Analysis; from memory):
    // h = 0.25, T = h·(f0/2 + f1 + f2 + f3 + f4/2) = 0.25 · 1.375 = 0.34375, against the exact 1/3.
    const r = integrateIntoBuckets(sampled((x) => x * x, 0, 1, 4), [0, UNIT_MS]);
    expect(r.valueHours[0]).toBeCloseTo(0.34375 * KWH_PER_UNIT_AREA, 12);
    expect(r.coveredHours[0]).toBeCloseTo(10 / 60, 12);
  });

  it('is exact for a straight line, whatever the segments (the rule’s error term holds f″)', () => {
    // Error of the composite rule: −(b − a)·h²·f″(ξ)/12 (any numerical-methods text; from memory), zero for f″ = 0.
    fc.assert(
      fc.property(fc.double({ min: -5, max: 50, noNaN: true }), fc.double({ min: -5, max: 5, noNaN: true }), fc.integer({ min: 1, max: 40 }), (c, m, n) => {
        const r = integrateIntoBuckets(sampled((x) => c + m * x, 0, 10, n * 10), [0, 10 * UNIT_MS]);
        // ∫₀¹⁰ (c + m·x) dx = 10c + 50m, in units of kW·10 min.
        expect(r.valueHours[0]).toBeCloseTo((10 * c + 50 * m) * KWH_PER_UNIT_AREA, 9);
      }),
    );
  });
});

describe('gaps (contract, section 5: an interval longer than 10 minutes counts for nothing)', () => {
  it('counts 10 minutes exactly, and nothing for 10 minutes and one second', () => {
    const edges = [0, 60 * MIN];
    expect(integrateIntoBuckets({ tsMs: [0, 10 * MIN], values: [6, 6] }, edges).valueHours[0]).toBeCloseTo(1, 12);
    expect(integrateIntoBuckets({ tsMs: [0, 10 * MIN + 1000], values: [6, 6] }, edges).valueHours[0]).toBe(0);
    expect(integrateIntoBuckets({ tsMs: [0, 10 * MIN + 1000], values: [6, 6] }, edges).coveredHours[0]).toBe(0);
  });

  it('a gap in the middle of a day loses only its own time', () => {
    // 6 kW from 00:00 to 06:00 every 5 minutes, a 2-hour outage, then 6 kW from 08:00 to 12:00.
    const tsMs: number[] = [];
    for (let t = 0; t <= 6 * 60 * MIN; t += 5 * MIN) tsMs.push(t);
    for (let t = 8 * 60 * MIN; t <= 12 * 60 * MIN; t += 5 * MIN) tsMs.push(t);
    const r = integrateIntoBuckets({ tsMs, values: tsMs.map(() => 6) }, [0, 24 * 60 * MIN]);
    expect(r.coveredHours[0]).toBeCloseTo(10, 12);
    expect(r.valueHours[0]).toBeCloseTo(60, 12);
  });
});

describe('month boundaries (contract, section 5: an interval crossing one is split in proportion to time)', () => {
  const hydro = { kind: 'hydro' as const, ratedKw: 50, designHeadM: 10, efficiency: 0.8 };

  it('23:55 to 00:05 at a steady 6 kW puts 0.5 kWh in each month', () => {
    const { samples } = energySamplesFrom(hydro, [
      { ts: Date.UTC(2026, 2, 31, 23, 55), kw: 6 },
      { ts: Date.UTC(2026, 3, 1, 0, 5), kw: 6 },
    ]);
    const months = monthlyEnergy(samples, { ratedKw: 50 });
    expect(months.map((m) => [m.month, m.kwh])).toEqual([
      ['2026-03', expect.closeTo(0.5, 12)],
      ['2026-04', expect.closeTo(0.5, 12)],
    ]);
  });

  it('shares the interval’s trapezoid by time, not by the line between its samples', () => {
    // 0 kW at 23:58 and 10 kW at 00:08: the trapezoid holds 5 kW × 10 min = 0.8333 kWh, 2 minutes of
    // it fall in March (1/5) and 8 in April (4/5). Integrating the line instead would give March 0.0333.
    const { samples } = energySamplesFrom(hydro, [
      { ts: Date.UTC(2026, 2, 31, 23, 58), kw: 0 },
      { ts: Date.UTC(2026, 3, 1, 0, 8), kw: 10 },
    ]);
    const [march, april] = monthlyEnergy(samples, { ratedKw: 50 });
    expect(march?.kwh).toBeCloseTo((5 * 10) / 60 / 5, 12);
    expect(april?.kwh).toBeCloseTo(((5 * 10) / 60) * (4 / 5), 12);
    expect(march?.totals.coveredHours).toBeCloseTo(2 / 60, 12);
  });

  it('the year’s energy is the same whether counted per month or in one piece', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.integer({ min: 1, max: 12 * MIN }), fc.double({ min: 0, max: 40, noNaN: true })), { minLength: 2, maxLength: 300 }),
        fc.integer({ min: 0, max: 11 }),
        fc.integer({ min: 0, max: 48 * 60 * MIN }),
        (steps, month, before) => {
          // Start up to two days before a month's end, so the series often crosses it.
          let ts = Date.UTC(2026, month + 1, 1) - before;
          const list = steps.map(([step, kw]) => ({ ts: (ts += step), kw }));
          const { samples } = energySamplesFrom(hydro, list);
          const months = monthlyEnergy(samples, { ratedKw: 50 });
          const whole = integrateIntoBuckets(
            { tsMs: samples.tsMs, values: samples.kw },
            [samples.tsMs[0] as number, (samples.tsMs[samples.length - 1] as number) + 1],
          );
          const sum = months.reduce((a, m) => a + m.totals.kwh, 0);
          expect(sum).toBeCloseTo(whole.valueHours[0] as number, 8);
          for (const m of months) expect(m.coveragePct).toBeLessThanOrEqual(100);
        },
      ),
    );
  });
});
