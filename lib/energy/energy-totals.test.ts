import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { energySamplesFrom, type EnergyInputSample } from './energy-samples';
import { energyTotalsByBucket, sumEnergyTotals } from './energy-totals';

const MIN = 60_000;
const T = Date.UTC(2026, 2, 1);
const hydro = { kind: 'hydro' as const, ratedKw: 50, designHeadM: 10, efficiency: 0.8 };
const wind = {
  kind: 'wind' as const,
  ratedKw: 10,
  powerCurve: [
    { ms: 3, kw: 0 },
    { ms: 11, kw: 10 },
  ],
  cutInMs: 3,
  cutOutMs: 25,
};

function totalsOf(list: EnergyInputSample[], edges = [T, T + 60 * MIN]) {
  return energyTotalsByBucket(energySamplesFrom(wind, list).samples, edges);
}

describe('energyTotalsByBucket', () => {
  it('integrates measured and expected power over their own samples', () => {
    // Wind 7 m/s -> 5 kW expected. The middle sample lacks kw; the last lacks wind speed.
    const [t] = totalsOf([
      { ts: T, kw: 4, windMs: 7 },
      { ts: T + 5 * MIN, windMs: 7 },
      { ts: T + 10 * MIN, kw: 4, windMs: 7 },
      { ts: T + 15 * MIN, kw: 4 },
    ]);
    if (t === undefined) throw new Error('one bucket');
    expect(t.periodHours).toBe(1);
    // kw series: T, T+10, T+15: 15 minutes at 4 kW.
    expect(t.coveredHours).toBeCloseTo(0.25, 12);
    expect(t.kwh).toBeCloseTo(1, 12);
    // expected series: T..T+10 at 5 kW.
    expect(t.expectedCoveredHours).toBeCloseTo(10 / 60, 12);
    expect(t.expectedKwh).toBeCloseTo(50 / 60, 12);
    // paired: T and T+10 only.
    expect(t.pairedCoveredHours).toBeCloseTo(10 / 60, 12);
    expect(t.pairedKwh).toBeCloseTo(40 / 60, 12);
    expect(t.pairedExpectedKwh).toBeCloseTo(50 / 60, 12);
  });

  it('counts each sample for half of each covered interval beside it in availability', () => {
    // Resource at all four samples; delivering at the 1st and 2nd only. Intervals of 4, 4 and 2 minutes.
    const [t] = totalsOf([
      { ts: T, kw: 2, windMs: 8 },
      { ts: T + 4 * MIN, kw: 1, windMs: 8 },
      { ts: T + 8 * MIN, kw: 0, windMs: 8 },
      { ts: T + 10 * MIN, kw: 0, windMs: 8 },
    ]);
    if (t === undefined) throw new Error('one bucket');
    expect(t.resourceHours).toBeCloseTo(10 / 60, 12);
    // Sample 1: half of 4 min; sample 2: half of 4 + half of 4.
    expect(t.deliveringHours).toBeCloseTo(6 / 60, 12);
  });

  it('leaves samples without kw or without wind speed out of availability', () => {
    const [t] = totalsOf([
      { ts: T, kw: 2, windMs: 8 },
      { ts: T + 4 * MIN, windMs: 8 },
      { ts: T + 8 * MIN, kw: 0 },
      { ts: T + 12 * MIN, kw: 2, windMs: 8 },
    ]);
    if (t === undefined) throw new Error('one bucket');
    // Only the first and last samples count, 12 minutes apart: more than 10, a gap.
    expect(t.resourceHours).toBe(0);
  });

  it('counts no resource below cut-in as no resource, whatever the unit delivers', () => {
    const [t] = totalsOf([
      { ts: T, kw: 0.1, windMs: 2 },
      { ts: T + 5 * MIN, kw: 0.1, windMs: 2 },
    ]);
    expect(t?.resourceHours).toBe(0);
    expect(t?.deliveringHours).toBe(0);
  });

  it('gives hydro the same treatment through flow', () => {
    const { samples } = energySamplesFrom(hydro, [
      { ts: T, kw: 30, flowM3s: 0.5 },
      { ts: T + 6 * MIN, kw: 0, flowM3s: 0.5 },
    ]);
    const [t] = energyTotalsByBucket(samples, [T, T + 60 * MIN]);
    expect(t?.resourceHours).toBeCloseTo(0.1, 12);
    expect(t?.deliveringHours).toBeCloseTo(0.05, 12);
    expect(t?.expectedKwh).toBeCloseTo(39.2266 * 0.1, 4);
  });

  it('adds up over buckets to the totals of one bucket', () => {
    const sampleArb = fc.record(
      {
        step: fc.integer({ min: 0, max: 14 * MIN }),
        kw: fc.option(fc.double({ min: -1, max: 12, noNaN: true }), { nil: undefined }),
        windMs: fc.option(fc.double({ min: 0, max: 30, noNaN: true }), { nil: undefined }),
      },
      { requiredKeys: ['step'] },
    );
    fc.assert(
      fc.property(fc.array(sampleArb, { maxLength: 50 }), fc.integer({ min: 1, max: 90 }), (steps, widthMin) => {
        let ts = T;
        const list = steps.map(({ step, kw, windMs }) => {
          ts += step;
          return { ts, kw, windMs };
        });
        const end = T + 50 * 14 * MIN + 1;
        const edges: number[] = [];
        for (let e = T; e < end; e += widthMin * MIN) edges.push(e);
        edges.push(end);
        const split = sumEnergyTotals(totalsOf(list, edges));
        const [whole] = totalsOf(list, [T, end]);
        if (whole === undefined) throw new Error('one bucket');
        for (const key of Object.keys(whole) as Array<keyof typeof whole>) {
          expect(split[key]).toBeCloseTo(whole[key], 8);
        }
      }),
    );
  });
});
