/**
 * The overspeed finding (contract, section 5) and what the findings tell a
 * crew. The cautions are common practice for work on permanent-magnet
 * generators, no single published source; the test pins that each finding
 * that sends someone to the machine says the safe thing first.
 */
import { describe, expect, it } from 'vitest';
import { TEST_NAMEPLATE, syntheticSamples } from '@/test/support/synthetic-unit';
import { diagnoseSamples, type DiagnosisResult } from './diagnose';
import { SAFETY_CAUTION, splitFindingMessage } from './findings';

const byCode = (r: DiagnosisResult, code: string) => r.findings.find((f) => f.code === code);

/** TEST_NAMEPLATE: ratedRpm 300, maxRpm 420. Shares of rated speed. */
const MAX_SHARE = TEST_NAMEPLATE.maxRpm / TEST_NAMEPLATE.ratedRpm;

describe('overspeed', () => {
  it('three samples above maxRpm give an alarm with the count, the highest speed and the time above', () => {
    // 720 samples 10 s apart sweeping 0.3 to 1.2 of rated; samples 100–102 at 1.45, 1.5 and 1.45 of rated (435, 450, 435 rpm).
    const high: Record<number, number> = { 100: 1.45, 101: 1.5, 102: 1.45 };
    const samples = syntheticSamples({ speedShare: (i) => high[i] ?? 0.3 + (0.9 * i) / 719, noise: 0 });
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples });
    const f = byCode(r, 'overspeed');
    expect(f?.severity).toBe('alarm');
    expect(f!.message).toContain('3 samples above the 420 rpm overspeed limit');
    expect(f!.message).toContain('highest 450 rpm');
    // Each of the three counts for half of the 10 s interval on each side: 3 × 10 s = 30 s.
    expect(f!.message).toContain('about 30 s above the limit');
    // It does not change the verdict (contract, section 5).
    expect(r.verdict).toBe('healthy');
  });

  it('is not hidden by the transient filter: a single spike between slow samples counts', () => {
    const samples = syntheticSamples({ speedShare: (i) => (i === 400 ? MAX_SHARE * 1.02 : 0.5 + (0.4 * i) / 719), noise: 0 });
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples });
    expect(r.details.samplesInTransient).toBeGreaterThan(0);
    expect(byCode(r, 'overspeed')?.message).toContain('1 sample above');
  });

  it('a sample exactly at maxRpm is not overspeed; one just above is', () => {
    const at = syntheticSamples({ speedShare: (i) => (i === 10 ? MAX_SHARE : 0.5 + (0.4 * i) / 719), noise: 0 });
    expect(byCode(diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: at }), 'overspeed')).toBeUndefined();
    const above = syntheticSamples({ speedShare: (i) => (i === 10 ? MAX_SHARE * 1.001 : 0.5 + (0.4 * i) / 719), noise: 0 });
    expect(byCode(diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: above }), 'overspeed')?.severity).toBe('alarm');
  });

  it('takes speed from the frequency when the sensor reads low, so a low-reading sensor cannot hide an overspeed', () => {
    // True speed up to 1.5 of rated (450 rpm) while the sensor reads 20 % low (360 rpm, under the limit).
    const samples = syntheticSamples({ speedShare: (i) => 0.3 + (1.2 * i) / 719, speedSensorFactor: 0.8, noise: 0 });
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples });
    expect(Math.max(...samples.map((s) => s.rpm))).toBeLessThan(TEST_NAMEPLATE.maxRpm);
    expect(r.verdict).toBe('speed-sensor-fault');
    const f = byCode(r, 'overspeed');
    expect(f?.severity).toBe('alarm');
    expect(f!.message).toContain('speed from the terminal frequency');
    expect(f!.message).toContain('highest 450 rpm');
  });

  it('tells the crew to stop it remotely, keep away until secured, and inspect before restart, with the caution', () => {
    const samples = syntheticSamples({ speedShare: (i) => (i < 5 ? 1.5 : 0.3 + (0.9 * i) / 719), noise: 0 });
    const parts = splitFindingMessage(byCode(diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples }), 'overspeed')!.message);
    expect(parts.nextSteps).toMatch(/^Stop the unit by its remote or automatic means/);
    expect(parts.nextSteps).toContain('Do not approach it until the rotor or runner is secured');
    expect(parts.nextSteps).toMatch(/blades or runner, the bearings/);
    expect(parts.nextSteps).toMatch(/[Bb]efore a restart/);
    expect(parts.caution).toBe(true);
  });
});

describe('what the findings tell a crew', () => {
  it('the caution names proving dead, other sources, hydro intake, wind tie-down and defers to the manufacturer and codes', () => {
    expect(SAFETY_CAUTION).toContain('prove dead');
    expect(SAFETY_CAUTION).toMatch(/battery banks, inverter back-feed and capacitors/);
    expect(SAFETY_CAUTION).toMatch(/close the intake.*water can start it again/);
    expect(SAFETY_CAUTION).toMatch(/furl or brake the rotor and tie it; do not climb in high wind; use fall protection/);
    expect(SAFETY_CAUTION).toMatch(/manufacturer's procedure, local electrical codes and licensed practice\.$/);
  });

  it('demagnetisation: the open-circuit test only by the manufacturer’s procedure, never by opening the load of a free-running machine', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ fluxFactor: 0.9 }) });
    const parts = splitFindingMessage(byCode(r, 'demagnetised')!.message);
    expect(parts.nextSteps).toMatch(/only by the manufacturer's test procedure, by qualified people/);
    expect(parts.nextSteps).toMatch(/overspeed protection in service and instruments rated for the voltage/);
    expect(parts.nextSteps).toContain('Never disconnect the load of a machine that is free to run');
    expect(parts.caution).toBe(true);
  });

  it('shorted turns: stop remotely first; checks only stopped, isolated and proven dead; insulation test with electronics disconnected', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ phaseEmfFactors: [1, 0.94, 1], ratedLoadKw: 5 }) });
    const parts = splitFindingMessage(byCode(r, 'shorted-turns')!.message);
    expect(parts.observation).toContain('heats');
    expect(parts.nextSteps).toMatch(/^Stop the unit first by the manufacturer's remote or automatic means; do not approach it while it runs\./);
    expect(parts.nextSteps).toContain('stopped, isolated and proven dead');
    expect(parts.nextSteps).toMatch(/Insulation-resistance testing applies a high test voltage: disconnect the rectifier, inverter and controller first/);
    expect(parts.caution).toBe(true);
  });

  it('a speed sensor reading low warns that the overspeed trip may be late, with the caution', () => {
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ speedSensorFactor: 0.9 }) });
    const parts = splitFindingMessage(byCode(r, 'speed-sensor-fault')!.message);
    expect(parts.observation).toContain('overspeed trip, that trip may come late');
    expect(parts.nextSteps).toMatch(/^Treat the overspeed protection as unproven/);
    expect(parts.caution).toBe(true);
    // A sensor reading high cannot delay the trip: no such line.
    const high = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ speedSensorFactor: 1.1 }) });
    expect(byCode(high, 'speed-sensor-fault')!.message).not.toContain('overspeed trip');
  });

  it('a dead speed sensor is reported as one, with the overspeed warning, not as missing frequency', () => {
    const samples = syntheticSamples().map((s) => ({ ...s, rpm: 0 }));
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples });
    expect(r.verdict).toBe('speed-sensor-fault');
    expect(r.speedRatio).toBeNull();
    expect(byCode(r, 'no-frequency')).toBeUndefined();
    const f = byCode(r, 'speed-sensor-fault')!;
    expect(f.message).toContain('reads 0 rpm');
    expect(f.message).toContain('overspeed trip');
  });

  it('findings that send someone into the cabinet carry the caution (voltage wiring, transducer ratio)', () => {
    const zeroV = syntheticSamples().map((s, i) => (i % 10 === 0 ? { ...s, vab: 0, vbc: 0, vca: 0 } : s));
    expect(splitFindingMessage(byCode(diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: zeroV }), 'no-voltage-at-speed')!.message).caution).toBe(true);
    const high = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: syntheticSamples({ fluxFactor: 1.08 }) });
    const f = byCode(high, 'ke-above-nameplate')!;
    expect(splitFindingMessage(f.message).nextSteps).toContain('transducer ratio');
    expect(splitFindingMessage(f.message).caution).toBe(true);
  });

  it('a unit held at one speed says why it cannot be judged and what does work', () => {
    const steady = syntheticSamples({ speedShare: () => 1, count: 2000 });
    const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples: steady });
    expect(r.verdict).toBe('insufficient-data');
    const parts = splitFindingMessage(byCode(r, 'insufficient-data')!.message);
    expect(parts.observation).toContain('one steady speed');
    expect(parts.observation).toContain('load controller');
    expect(parts.nextSteps).toContain('start-up or a run-down');
    expect(parts.nextSteps).not.toMatch(/longer log/);
  });

  it('prose carries no raw field names, and Ke intervals have 3 decimals', () => {
    const cases = [
      syntheticSamples({ fluxFactor: 0.9 }),
      syntheticSamples({ phaseEmfFactors: [1, 0.94, 1], ratedLoadKw: 5 }),
      syntheticSamples({ speedSensorFactor: 1.1 }),
      syntheticSamples({ omit: ['statorC', 'ambientC', 'hz', 'vbc', 'vca'] }),
    ];
    for (const samples of cases) {
      const r = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples });
      for (const f of r.findings) {
        expect(f.message, f.code).not.toMatch(/\b(statorC|ambientC|keRefC|vab|vbc|vca|hz \/)\b/);
        for (const m of f.message.matchAll(/interval (\d+\.\d+) to (\d+\.\d+)/g)) {
          expect(m[1]!.split('.')[1]).toHaveLength(3);
          expect(m[2]!.split('.')[1]).toHaveLength(3);
        }
      }
    }
  });
});

describe('overspeed times', () => {
  it('are written for people: date, time to the second and UTC', () => {
    const samples = syntheticSamples({ speedShare: (i) => (i === 6 ? 1.5 : 0.3 + (0.9 * i) / 719), noise: 0, startMs: Date.UTC(2026, 2, 1, 0, 0, 0) });
    const f = diagnoseSamples({ nameplate: TEST_NAMEPLATE, samples }).findings.find((x) => x.code === 'overspeed')!;
    // Sample 6 is 60 s after the start.
    expect(f.message).toContain('at 2026-03-01 00:01:00 UTC');
  });
});
