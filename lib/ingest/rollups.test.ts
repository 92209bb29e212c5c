import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { integrateIntoBuckets } from '@/lib/energy/integrate';
import type { TelemetrySample } from '@/lib/contract/telemetry';
import { computeRollupDeltas, rollupRowsOf, TEN_MINUTES_MS, DAY_MS, type EnergyPoint, type RollupDelta } from './rollups';

/** What the neighbour query of the ingest transaction returns, done in memory. */
function neighbours(stored: Map<number, number>, batch: readonly TelemetrySample[]): EnergyPoint[] {
  const kwTs = batch.filter((s) => s.kw !== undefined).map((s) => s.ts);
  if (kwTs.length === 0) return [];
  const lo = Math.min(...kwTs);
  const hi = Math.max(...kwTs);
  const all = [...stored.entries()].map(([ts, kw]) => ({ ts, kw })).sort((a, b) => a.ts - b.ts);
  const before = all.filter((p) => p.ts < lo && p.ts >= lo - 600_000).slice(-1);
  const inside = all.filter((p) => p.ts >= lo && p.ts <= hi);
  const after = all.filter((p) => p.ts > hi && p.ts <= hi + 600_000).slice(0, 1);
  return [...before, ...inside, ...after];
}

function accumulate(into: Map<number, { kwh: number; coveredS: number; samples: number }>, deltas: readonly RollupDelta[]) {
  for (const d of deltas) {
    const row = into.get(d.bucketStartMs) ?? { kwh: 0, coveredS: 0, samples: 0 };
    row.kwh += d.kwh;
    row.coveredS += d.coveredS;
    row.samples += d.samples;
    into.set(d.bucketStartMs, row);
  }
}

const sample = (ts: number, kw: number | undefined): TelemetrySample => ({ ts, rpm: 250, vab: 230, kw: kw === undefined ? undefined : Math.fround(kw) });

/** The deltas of `inserted` (any order) given the stored neighbours. */
const deltasOf = (stored: EnergyPoint[], inserted: readonly TelemetrySample[]) =>
  computeRollupDeltas({ unitKey: 1, stored, rows: rollupRowsOf(inserted, 'wind') });

describe('incremental rollups', () => {
  it('gives the trapezoid of a worked example (6 kW then 12 kW five minutes later: 0.75 kWh)', () => {
    // Trapezoid rule, (6 + 12) / 2 kW × 5/60 h = 0.75 kWh (any calculus text).
    const { tenMinute, daily } = deltasOf([], [sample(0, 6), sample(300_000, 12)]);
    expect(tenMinute).toHaveLength(1);
    expect(tenMinute[0]!.kwh).toBeCloseTo(0.75, 12);
    expect(tenMinute[0]!.coveredS).toBe(300);
    expect(tenMinute[0]!.samples).toBe(2);
    expect(daily[0]!.kwh).toBeCloseTo(0.75, 12);
  });

  it('counts nothing across a gap longer than 10 minutes (contract, section 5)', () => {
    const { tenMinute } = deltasOf([], [sample(0, 6), sample(600_001, 6)]);
    expect(tenMinute.reduce((s, d) => s + d.kwh, 0)).toBe(0);
    expect(tenMinute.reduce((s, d) => s + d.coveredS, 0)).toBe(0);
  });

  it('shares an interval across a bucket edge in proportion to time', () => {
    // 4 kW flat from 9 to 13 minutes past: 1 minute in the first bucket, 3 in the second.
    const { tenMinute } = deltasOf([], [sample(540_000, 4), sample(780_000, 4)]);
    const byBucket = new Map(tenMinute.map((d) => [d.bucketStartMs, d]));
    expect(byBucket.get(0)!.kwh).toBeCloseTo(4 / 60, 12);
    expect(byBucket.get(600_000)!.kwh).toBeCloseTo((4 * 3) / 60, 12);
    expect(byBucket.get(0)!.coveredS + byBucket.get(600_000)!.coveredS).toBe(240);
  });

  it('replaces the interval a late sample splits instead of adding to it', () => {
    // Stored 0 kW at 0 s and 0 kW at 300 s; a late 12 kW at 150 s adds two triangles: 2 × (12/2 kW × 150 s) = 0.5 kWh.
    const stored = [{ ts: 0, kw: 0 }, { ts: 300_000, kw: 0 }];
    const { tenMinute } = deltasOf(stored, [sample(150_000, 12)]);
    expect(tenMinute.reduce((s, d) => s + d.kwh, 0)).toBeCloseTo(0.5, 12);
    expect(tenMinute.reduce((s, d) => s + d.coveredS, 0)).toBe(0);
    expect(tenMinute.reduce((s, d) => s + d.samples, 0)).toBe(1);
  });

  it('leaves samples without kw out of energy and coverage but counts them', () => {
    const { tenMinute } = deltasOf([], [sample(0, undefined), sample(60_000, undefined)]);
    expect(tenMinute[0]!.samples).toBe(2);
    expect(tenMinute[0]!.coveredS).toBe(0);
    expect(tenMinute[0]!.kw.count).toBe(0);
  });

  it('rounds values to the stored float4 precision and averages the line voltages given', () => {
    const r = rollupRowsOf([{ ts: 0, rpm: 300.1, vab: 230, vbc: 232 }], 'wind');
    expect(r.rpm[0]).toBe(Math.fround(300.1));
    expect(r.vll[0]).toBe(231);
    expect(r.amps[0]).toBeNaN();
    expect(rollupRowsOf([{ ts: 0, rpm: 1, vab: 1, flowM3s: 0.3, windMs: 9 }], 'hydro').resource[0]).toBe(Math.fround(0.3));
  });

  it('equals a recomputation from the whole series, whatever the batches and their order (property)', () => {
    // Reference: lib/energy integrateIntoBuckets over the final series (an independent implementation).
    const arbitrarySeries = fc.uniqueArray(fc.integer({ min: 0, max: 4 * 3600 }), { minLength: 2, maxLength: 60 }).chain((seconds) =>
      fc.tuple(
        fc.constant(seconds.map((s) => s * 1000)),
        fc.array(fc.option(fc.float({ min: -5, max: 50, noNaN: true }), { nil: undefined }), { minLength: seconds.length, maxLength: seconds.length }),
        fc.array(fc.integer({ min: 0, max: 5 }), { minLength: seconds.length, maxLength: seconds.length }),
        fc.array(fc.boolean(), { minLength: seconds.length, maxLength: seconds.length }),
      ),
    );
    fc.assert(
      fc.property(arbitrarySeries, ([tsList, kwList, batchOf, redeliver]) => {
        const samples = tsList.map((ts, i) => sample(ts, kwList[i]));
        const batches: TelemetrySample[][] = [[], [], [], [], [], []];
        samples.forEach((s, i) => {
          batches[batchOf[i]!]!.push(s);
          // A redelivered duplicate in a later batch must change nothing.
          if (redeliver[i]) batches[Math.min(5, batchOf[i]! + 1)]!.push(s);
        });
        const stored = new Map<number, number>();
        const storedTs = new Set<number>();
        const total = new Map<number, { kwh: number; coveredS: number; samples: number }>();
        for (const batch of batches) {
          const fresh = new Map<number, TelemetrySample>();
          for (const s of batch) if (!storedTs.has(s.ts) && !fresh.has(s.ts)) fresh.set(s.ts, s);
          const inserted = [...fresh.values()];
          const near = neighbours(stored, inserted);
          accumulate(total, deltasOf(near, inserted).tenMinute);
          for (const s of inserted) {
            storedTs.add(s.ts);
            if (s.kw !== undefined) stored.set(s.ts, s.kw);
          }
        }
        const series = [...stored.entries()].sort((a, b) => a[0] - b[0]);
        const edges: number[] = [];
        for (let e = 0; e <= 4 * 3600 * 1000 + TEN_MINUTES_MS; e += TEN_MINUTES_MS) edges.push(e);
        const reference = integrateIntoBuckets({ tsMs: series.map((p) => p[0]), values: series.map((p) => p[1]) }, edges);
        for (let k = 0; k < edges.length - 1; k++) {
          const got = total.get(edges[k]!) ?? { kwh: 0, coveredS: 0, samples: 0 };
          expect(got.kwh).toBeCloseTo(reference.valueHours[k]!, 9);
          expect(got.coveredS).toBeCloseTo(reference.coveredHours[k]! * 3600, 6);
          expect(got.samples).toBe(samples.filter((s) => Math.floor(s.ts / TEN_MINUTES_MS) === k).length);
        }
      }),
      { numRuns: 300 },
    );
  });

  it('sums the ten-minute deltas into the daily ones', () => {
    const inserted = [sample(DAY_MS - 300_000, 2), sample(DAY_MS + 300_000, 4)];
    const { tenMinute, daily } = deltasOf([], inserted);
    expect(daily.map((d) => d.bucketStartMs).sort()).toEqual([0, DAY_MS]);
    expect(daily.reduce((s, d) => s + d.kwh, 0)).toBeCloseTo(tenMinute.reduce((s, d) => s + d.kwh, 0), 12);
    // 2 kW to 4 kW over 10 minutes is 0.5 kWh; split at midnight in proportion to time
    // (contract, section 5), each day gets half: 3 kW × 5/60 h.
    expect(daily.find((d) => d.bucketStartMs === 0)!.kwh).toBeCloseTo((3 * 5) / 60, 12);
    expect(daily.find((d) => d.bucketStartMs === DAY_MS)!.kwh).toBeCloseTo((3 * 5) / 60, 12);
  });
});
