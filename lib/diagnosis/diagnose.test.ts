/**
 * Scenario tests of the diagnosis on telemetry from the forward generator
 * model (test/support/synthetic-unit.ts), one per verdict and the cases where
 * plain terminal volts per rpm would mislead, plus property tests of its
 * invariants.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { TelemetrySample } from '../contract/telemetry';
import { diagnoseSamples, type DiagnosisResult } from './diagnose';
import { SAFETY_CAUTION } from './findings';
import { SampleColumns } from './sample-columns';
import { TEST_NAMEPLATE, seededRandom, syntheticSamples, testNameplate } from '../../test/support/synthetic-unit';

const codes = (r: DiagnosisResult) => r.findings.map((f) => f.code);
const byCode = (r: DiagnosisResult, code: string) => r.findings.find((f) => f.code === code);

/** Every number in the result is finite: missing data shows as null, never NaN. */
function expectNoNaN(value: unknown, path = 'result'): void {
  if (typeof value === 'number') expect(Number.isFinite(value), path).toBe(true);
  else if (Array.isArray(value)) value.forEach((v, i) => expectNoNaN(v, `${path}[${i}]`));
  else if (value !== null && typeof value === 'object') for (const [k, v] of Object.entries(value)) expectNoNaN(v, `${path}.${k}`);
}

describe('diagnoseSamples verdicts', () => {
  it('healthy unit, open circuit', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples() });
    expect(r.verdict).toBe('healthy');
    expect(r.samplesUsed).toBe(720);
    expect(r.keRatio).toBeCloseTo(1, 2);
    expect(r.keRatioLow!).toBeLessThan(1.0005);
    expect(r.keRatioHigh!).toBeGreaterThan(0.9995);
    expect(r.speedRatio).toBeCloseTo(1, 2);
    expect(r.unbalancePct!).toBeLessThan(0.5);
    expect(codes(r)).toContain('ke-normal');
    expectNoNaN(r);
  });

  it('heavy load on a healthy unit: naive V/rpm looks demagnetised, the corrected Ke does not', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ ratedLoadKw: 10, statorC: 60, powerFactor: 0.9 }) });
    expect(r.details.naiveKeRatio!).toBeLessThan(0.9);
    expect(r.verdict).toBe('healthy');
    expect(r.keRatio).toBeCloseTo(1, 2);
    expect(r.details.loadCorrectionPct!).toBeGreaterThan(2);
  });

  it('cold NdFeB: naive V/rpm reads high, the temperature-corrected Ke is on nameplate', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ statorC: -20 }) });
    // NdFeB −0.12 %/°C, 40 °C below reference: +4.8 % (contract, section 5).
    expect(r.details.naiveKeRatio).toBeCloseTo(1.048, 2);
    expect(r.keRatio).toBeCloseTo(1, 2);
    expect(r.verdict).toBe('healthy');
    expect(r.details.magnetTempSource).toBe('statorC');
    expect(r.details.magnetMeanC).toBe(-20);
  });

  it('hot ferrite: naive V/rpm reads 10 % low, the corrected Ke is healthy', () => {
    const ferrite = testNameplate({ magnet: 'ferrite' });
    const r = diagnoseSamples({ nameplate: ferrite, samples: syntheticSamples({ nameplate: ferrite, statorC: 70, ratedLoadKw: 4 }) });
    expect(r.details.naiveKeRatio!).toBeLessThan(0.9);
    expect(r.details.magnetCoeffPctPerC).toBe(-0.2);
    expect(r.keRatio).toBeCloseTo(1, 2);
    expect(r.verdict).toBe('healthy');
  });

  it('takes the magnet temperature from ambientC when statorC is absent', () => {
    const samples = syntheticSamples({ statorC: 35, ambientC: 35, omit: ['statorC'] });
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples });
    expect(r.details.magnetTempSource).toBe('ambientC');
    expect(r.keRatio).toBeCloseTo(1, 2);
  });

  it('no temperature at all: no correction, and a finding says so', () => {
    const samples = syntheticSamples({ statorC: 20, omit: ['statorC', 'ambientC'] });
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples });
    expect(r.details.magnetTempSource).toBe('keRefC');
    expect(codes(r)).toContain('no-temperature');
  });

  it('demagnetised: 8 % flux loss on all phases, under load', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ fluxFactor: 0.92, ratedLoadKw: 5, statorC: 45 }) });
    expect(r.verdict).toBe('demagnetised');
    expect(r.keRatio).toBeCloseTo(0.92, 2);
    const f = byCode(r, 'demagnetised')!;
    expect(f.severity).toBe('alarm');
    expect(f.message).toContain('0.95');
    expect(f.message).toContain(SAFETY_CAUTION);
    expect(r.findings[0]!.code).toBe('demagnetised');
  });

  it('healthy with a warning between the warning and alarm thresholds', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ fluxFactor: 0.96 }) });
    expect(r.verdict).toBe('healthy');
    expect(byCode(r, 'ke-low')?.severity).toBe('warning');
  });

  it('shorted turns: one phase EMF 6 % low unbalances the line voltages and names the phase', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ phaseEmfFactors: [1, 0.94, 1], ratedLoadKw: 5 }) });
    expect(r.verdict).toBe('shorted-turns');
    expect(r.unbalancePct!).toBeGreaterThan(2);
    expect(r.details.negativeSequencePct!).toBeGreaterThan(2);
    const f = byCode(r, 'shorted-turns')!;
    expect(f.severity).toBe('alarm');
    expect(f.message).toContain('phase b is the weakest');
    expect(f.message).toContain(SAFETY_CAUTION);
  });

  it('speed-sensor fault: rpm reads 10 % high, Ke from frequency speed still judges the magnets', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ speedSensorFactor: 1.1 }) });
    expect(r.verdict).toBe('speed-sensor-fault');
    expect(r.speedRatio).toBeCloseTo(1 / 1.1, 2);
    expect(r.details.speedSource).toBe('hz');
    expect(r.keRatio).toBeCloseTo(1, 2);
    // Volts over the sensor's rpm would read 1/1.1 of nameplate: demagnetised by the naive measure.
    expect(r.details.naiveKeRatio).toBeCloseTo(1 / 1.1, 2);
    expect(byCode(r, 'speed-sensor-fault')!.message).toContain(SAFETY_CAUTION);
    expect(byCode(r, 'magnets-with-frequency-speed')!.message).toContain('look healthy');
  });

  it('speed-sensor fault with weak magnets reports both', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ speedSensorFactor: 0.5, fluxFactor: 0.9 }) });
    expect(r.verdict).toBe('speed-sensor-fault');
    expect(r.keRatio).toBeCloseTo(0.9, 2);
    expect(byCode(r, 'magnets-with-frequency-speed')!.severity).toBe('alarm');
  });

  it('dead speed sensor (reads 0) is a sensor fault, not insufficient data', () => {
    const samples = syntheticSamples().map((s) => ({ ...s, rpm: 0 }));
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples });
    expect(r.verdict).toBe('speed-sensor-fault');
    expect(r.speedRatio).toBeNull();
    expect(r.samplesUsed).toBe(720);
    expect(r.keRatio).toBeCloseTo(1, 2);
  });

  it('insufficient data: fewer than 30 samples', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ count: 29 }) });
    expect(r.verdict).toBe('insufficient-data');
    expect(byCode(r, 'insufficient-data')!.message).toContain('29');
    expectNoNaN(r);
  });

  it('insufficient data: speed range narrower than 10 % of rated', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ speedRange: [0.6, 0.68] }) });
    expect(r.samplesUsed).toBe(720);
    expect(r.verdict).toBe('insufficient-data');
  });

  it('insufficient data: the machine stood still', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ speedRange: [0.01, 0.1] }) });
    expect(r.verdict).toBe('insufficient-data');
    expect(r.samplesUsed).toBe(0);
    expect(r.keRatio).toBeNull();
    expect(r.unbalancePct).toBeNull();
    expect(r.details.samplesBelowSpeed).toBe(720);
    expectNoNaN(r);
  });

  it('no samples at all', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: [] });
    expect(r.verdict).toBe('insufficient-data');
    expect(r.speedRatio).toBeNull();
    expectNoNaN(r);
  });
});

describe('diagnoseSamples filters and partial data', () => {
  it('drops samples below 15 % of rated speed', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ speedRange: [0.05, 1.0], count: 2000 }) });
    expect(r.details.samplesBelowSpeed).toBeGreaterThan(0);
    expect(r.details.speedMinRpm!).toBeGreaterThanOrEqual(0.15 * 300);
    expect(r.samplesUsed + r.details.samplesBelowSpeed).toBe(2000);
  });

  it('drops the samples on both sides of a speed jump', () => {
    const samples = syntheticSamples();
    // A 60 rpm jump between two samples 10 s apart is 6 rpm/s, above 2 % of 300 rpm per second.
    const spiked = samples.map((s, i) => (i === 300 ? { ...s, rpm: s.rpm + 60 } : s));
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: spiked });
    expect(r.details.samplesInTransient).toBe(3);
    expect(r.samplesUsed).toBe(717);
    expect(r.keRatio).toBeCloseTo(1, 2);
  });

  it('only vab: unbalance null with a finding, Ke still judged', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ omit: ['vbc', 'vca'] }) });
    expect(r.unbalancePct).toBeNull();
    expect(r.details.phaseKeRatio).toBeNull();
    expect(codes(r)).toContain('no-unbalance');
    expect(r.verdict).toBe('healthy');
  });

  it('no hz: speed ratio null with a finding', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ omit: ['hz'] }) });
    expect(r.speedRatio).toBeNull();
    expect(codes(r)).toContain('no-frequency');
    expect(r.verdict).toBe('healthy');
  });

  it('no currents given: treated as open circuit (contract, section 1)', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ omit: ['ia', 'ib', 'ic', 'kw'] }) });
    expect(r.details.loadedSharePct).toBe(0);
    expect(r.keRatio).toBeCloseTo(1, 2);
  });

  it('kW absent under load: unity power factor, as the contract says', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ ratedLoadKw: 8, powerFactor: 1, omit: ['kw'] }) });
    expect(r.keRatio).toBeCloseTo(1, 2);
  });

  it('0 V at speed is not used and is reported with the caution', () => {
    const samples = syntheticSamples().map((s, i) => (i % 100 === 0 ? { ...s, vab: 0, vbc: 0, vca: 0 } : s));
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples });
    expect(r.details.samplesWithoutVoltage).toBe(8);
    expect(byCode(r, 'no-voltage-at-speed')!.message).toContain(SAFETY_CAUTION);
    expect(r.keRatio).toBeCloseTo(1, 2);
  });

  it('thresholds come from nameplate.diagnosis and from the caller', () => {
    const samples = syntheticSamples({ fluxFactor: 0.92 });
    const lenient = testNameplate({ diagnosis: { keAlarmRatio: 0.9, keWarnRatio: 0.95 } });
    const r = diagnoseSamples({ nameplate: lenient, samples });
    expect(r.verdict).toBe('healthy');
    expect(byCode(r, 'ke-low')).toBeDefined();
    expect(r.details.limits.keAlarmRatio).toBe(0.9);
    expect(diagnoseSamples({ nameplate: lenient, samples, limits: { minSamples: 1000 } }).verdict).toBe('insufficient-data');
    const strict = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples(), limits: { unbalanceAlarmPct: 0.1 } });
    expect(strict.verdict).toBe('shorted-turns');
  });
});

/** Scales voltages by k, currents by k and kW by k², which scales every EMF by k. */
function scaleElectrical(samples: readonly TelemetrySample[], k: number): TelemetrySample[] {
  return samples.map((s) => ({
    ...s,
    vab: s.vab * k,
    vbc: s.vbc === undefined ? undefined : s.vbc * k,
    vca: s.vca === undefined ? undefined : s.vca * k,
    ia: s.ia === undefined ? undefined : s.ia * k,
    ib: s.ib === undefined ? undefined : s.ib * k,
    ic: s.ic === undefined ? undefined : s.ic * k,
    kw: s.kw === undefined ? undefined : s.kw * k * k,
  }));
}

describe('diagnoseSamples properties', () => {
  const base = syntheticSamples({ count: 200, ratedLoadKw: 6, statorC: 40 });
  const openCircuit = syntheticSamples({ count: 200, seed: 7 });

  it('scaling all voltages and Ke together leaves the ratio unchanged (open circuit)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.1, max: 5, noNaN: true }), (k) => {
        const a = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: openCircuit });
        const scaled = scaleElectrical(openCircuit, k);
        const b = diagnoseSamples({ nameplate: testNameplate({ keVPerKrpm: TEST_NAMEPLATE.keVPerKrpm * k }), samples: scaled });
        // Measurements are stored as 32-bit floats: agreement to 1e-6.
        expect(b.keRatio!).toBeCloseTo(a.keRatio!, 6);
        expect(b.unbalancePct!).toBeCloseTo(a.unbalancePct!, 4);
      }),
      { numRuns: 25 },
    );
  });

  it('scaling voltages, currents (kW by k²) and Ke together leaves the ratio unchanged under load', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.2, max: 5, noNaN: true }), (k) => {
        const a = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: base });
        // R and X are fixed, so an EMF scaled by k needs currents scaled by k too: E = kV + kI·Z.
        const b = diagnoseSamples({ nameplate: testNameplate({ keVPerKrpm: TEST_NAMEPLATE.keVPerKrpm * k }), samples: scaleElectrical(base, k) });
        expect(b.keRatio!).toBeCloseTo(a.keRatio!, 5);
      }),
      { numRuns: 25 },
    );
  });

  it('the result does not depend on the order of the samples', () => {
    const reference = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: base });
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), (seed) => {
        const random = seededRandom(seed);
        const shuffled = [...base];
        for (let i = shuffled.length - 1; i > 0; i--) {
          const j = Math.floor(random() * (i + 1));
          [shuffled[i], shuffled[j]] = [shuffled[j]!, shuffled[i]!];
        }
        const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: shuffled });
        expect(r.keRatio).toBe(reference.keRatio);
        expect(r.keRatioLow).toBe(reference.keRatioLow);
        expect(r.unbalancePct).toBe(reference.unbalancePct);
        expect(r.speedRatio).toBe(reference.speedRatio);
        expect(r.samplesUsed).toBe(reference.samplesUsed);
      }),
      { numRuns: 20 },
    );
  });

  it('open-circuit samples need no correction: R and L do not matter and Ke equals terminal V/rpm', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 5, noNaN: true }), fc.double({ min: 0, max: 50, noNaN: true }), (ohm, mh) => {
        const r = diagnoseSamples({ nameplate: testNameplate({ phaseOhm: ohm, phaseMh: mh }), samples: openCircuit });
        const plain = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: openCircuit });
        expect(r.keRatio).toBe(plain.keRatio);
        // Magnets at keRefC (20 °C) and no current: corrected and naive are the same fit.
        expect(r.keRatio!).toBeCloseTo(r.details.naiveKeRatio!, 12);
      }),
      { numRuns: 25 },
    );
  });

  it('a SampleColumns store gives the same result as the sample objects', () => {
    const a = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: base });
    const b = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: SampleColumns.from(base) });
    expect(b).toEqual(a);
  });
});
