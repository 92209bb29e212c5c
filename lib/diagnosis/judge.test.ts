/**
 * The numbers of the diagnosis on their own: judge() on telemetry from the
 * forward generator model (test/support/synthetic-unit.ts), the verdict's
 * order of precedence (contract, section 5) and the weakest-phase rule, and
 * that diagnoseSamples is exactly judge() put into words.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { TEST_NAMEPLATE, syntheticSamples } from '@/test/support/synthetic-unit';
import { diagnoseSamples, resultOf } from './diagnose';
import { findingsOf, sortFindings } from './findings';
import { judge, verdictOf, weakestPhase, VERDICTS } from './judge';
import { DEFAULT_LIMITS } from './limits';
import { SampleColumns } from './sample-columns';

describe('judge', () => {
  it('a healthy unit: every sample used from the sensor, Ke on nameplate, nothing over the limit', () => {
    const j = judge({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples() });
    expect(j.verdict).toBe('healthy');
    expect(j.samplesTotal).toBe(720);
    expect(j.track).toMatchObject({ source: 'rpm', count: 720, belowSpeed: 0, inTransient: 0, withoutVoltage: 0, missing: 0 });
    expect(j.speedSpanRpm).toBeCloseTo(j.track.maxRpm - j.track.minRpm, 9);
    expect(j.sensorFault).toBe(false);
    expect(j.insufficient).toBe(false);
    expect(j.fit.ke!.slope).toBeCloseTo(1, 2);
    expect(j.speedRatio).toBeCloseTo(1, 2);
    expect(j.overspeed).toBeUndefined();
    expect(j.usedFromTs).toBe('2026-03-01T00:00:00.000Z');
    expect(j.usedToTs).toBe('2026-03-01T01:59:50.000Z');
    expect(j.limits).toEqual(DEFAULT_LIMITS);
  });

  it('a sensor reading 8 % high: speed from the frequency, the sensor at fault, the magnets judged anyway', () => {
    const j = judge({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ speedSensorFactor: 1.08 }) });
    expect(j.sensorFault).toBe(true);
    expect(j.track.source).toBe('hz');
    // Frequency over the sensor's equivalent: 1 / 1.08 = 0.926 (arithmetic by hand).
    expect(j.speedRatio).toBeCloseTo(1 / 1.08, 2);
    expect(j.verdict).toBe('speed-sensor-fault');
    expect(j.fit.ke!.slope).toBeCloseTo(1, 2);
  });

  it('a dead sensor (0 rpm) with the frequency showing the machine turning: a fault with no ratio to state', () => {
    const j = judge({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ speedSensorFactor: 0 }) });
    expect(j.sensorFault).toBe(true);
    expect(j.speedRatio).toBeUndefined();
    expect(j.track.source).toBe('hz');
  });

  it('too few samples: insufficient, whatever the Ke', () => {
    const j = judge({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ count: 20, fluxFactor: 0.8 }) });
    expect(j.insufficient).toBe(true);
    expect(j.verdict).toBe('insufficient-data');
  });

  it('counts the overspeed run over all samples: three above the limit, 10 s apart, 30 s above in all', () => {
    // Each of the three counts for half of the 10 s interval on each side: 3 × 10 s (as lib/diagnosis/overspeed.test.ts).
    const high: Record<number, number> = { 100: 1.45, 101: 1.5, 102: 1.45 };
    const j = judge({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ speedShare: (i) => high[i] ?? 0.3 + (0.9 * i) / 719, noise: 0 }) });
    expect(j.overspeed).toMatchObject({ samples: 3, seconds: 30 });
    expect(j.overspeed!.peakRpm).toBeCloseTo(450, 6);
    expect(j.verdict).toBe('healthy');
  });

  it('is the same from sample objects, from a column store and from the samples shuffled', () => {
    const samples = syntheticSamples({ ratedLoadKw: 6, statorC: 40, phaseEmfFactors: [1, 0.97, 1] });
    const shuffled = [...samples].reverse();
    const a = judge({ nameplate: TEST_NAMEPLATE, samples });
    expect(judge({ nameplate: TEST_NAMEPLATE, samples: SampleColumns.from(samples) })).toEqual(a);
    expect(judge({ nameplate: TEST_NAMEPLATE, samples: shuffled })).toEqual(a);
  });

  it('names a bad nameplate', () => {
    expect(() => judge({ nameplate: { ...TEST_NAMEPLATE, ratedRpm: 0 }, samples: [] })).toThrow(/ratedRpm.*0/);
    expect(() => judge({ nameplate: { ...TEST_NAMEPLATE, keVPerKrpm: -1 }, samples: [] })).toThrow(/keVPerKrpm.*-1/);
  });
});

describe('diagnoseSamples is judge() put into words', () => {
  it('gives the result of the judgement with its findings, the caller’s sorted in', () => {
    for (const options of [{}, { fluxFactor: 0.9 }, { phaseEmfFactors: [1, 0.94, 1] as const }, { speedSensorFactor: 1.08 }, { count: 20 }]) {
      const samples = syntheticSamples(options);
      const extra = [{ code: 'rows-skipped', severity: 'warning' as const, message: 'x' }];
      const j = judge({ nameplate: TEST_NAMEPLATE, samples });
      expect(diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples, extraFindings: extra })).toEqual(resultOf(j, sortFindings([...extra, ...findingsOf(j)])));
    }
  });
});

describe('verdictOf', () => {
  const base = { insufficient: false, sensorFault: false, keRatio: 1, unbalancePct: 0.3, limits: DEFAULT_LIMITS };

  it('takes the contract’s order: insufficient data, speed sensor, shorted turns, demagnetised, healthy', () => {
    expect(verdictOf({ ...base, insufficient: true, sensorFault: true, keRatio: 0.5, unbalancePct: 9 })).toBe('insufficient-data');
    expect(verdictOf({ ...base, sensorFault: true, keRatio: 0.5, unbalancePct: 9 })).toBe('speed-sensor-fault');
    expect(verdictOf({ ...base, keRatio: 0.5, unbalancePct: 9 })).toBe('shorted-turns');
    expect(verdictOf({ ...base, keRatio: 0.5 })).toBe('demagnetised');
    expect(verdictOf(base)).toBe('healthy');
  });

  it('puts a figure exactly on its line on the healthy side (above, not at: contract, section 5)', () => {
    expect(verdictOf({ ...base, unbalancePct: DEFAULT_LIMITS.unbalanceAlarmPct })).toBe('healthy');
    expect(verdictOf({ ...base, keRatio: DEFAULT_LIMITS.keAlarmRatio })).toBe('healthy');
    expect(verdictOf({ ...base, keRatio: undefined, unbalancePct: undefined })).toBe('healthy');
  });

  it('always gives one of the verdicts', () => {
    fc.assert(
      fc.property(fc.boolean(), fc.boolean(), fc.option(fc.double({ min: 0, max: 2, noNaN: true }), { nil: undefined }), fc.option(fc.double({ min: 0, max: 20, noNaN: true }), { nil: undefined }), (insufficient, sensorFault, keRatio, unbalancePct) => {
        expect(VERDICTS).toContain(verdictOf({ insufficient, sensorFault, keRatio, unbalancePct, limits: DEFAULT_LIMITS }));
      }),
    );
  });
});

describe('weakestPhase', () => {
  it('names a phase only when it stands out from the other two by more than 0.005', () => {
    expect(weakestPhase({ a: 1, b: 0.94, c: 1 })).toBe('b');
    expect(weakestPhase({ a: 0.99, b: 1, c: 0.996 })).toBe('a');
    expect(weakestPhase({ a: 1, b: 0.998, c: 1.001 })).toBeUndefined();
    // Two low together: neither stands out.
    expect(weakestPhase({ a: 0.95, b: 0.951, c: 1 })).toBeUndefined();
  });
});
