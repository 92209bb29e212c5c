import { describe, expect, it } from 'vitest';
import { diagnoseSamples, type DiagnosisNameplate } from '@/lib/diagnosis/diagnose';
import { emfChart, type EmfSample } from './emf-points';
import { fitThroughOrigin } from '@/lib/physics/through-origin-fit';

const nameplate: DiagnosisNameplate = {
  ratedRpm: 300,
  maxRpm: 450,
  poles: 24,
  keVPerKrpm: 1000,
  keRefC: 20,
  magnet: 'ndfeb',
  phaseOhm: 0.4,
  phaseMh: 3,
};

/** Samples of a machine whose EMF is `ratio` of nameplate, loaded, at changing temperatures (forward model: terminal = E − I·Z drop). */
function samples(ratio: number): EmfSample[] {
  const out: EmfSample[] = [];
  for (let i = 0; i < 200; i++) {
    const rpm = 80 + (i % 50) * 4;
    const statorC = 10 + (i % 7) * 10;
    const ke = nameplate.keVPerKrpm * ratio * (1 - 0.0012 * (statorC - 20));
    const emfPhase = (ke * rpm) / 1000 / Math.sqrt(3);
    const amps = rpm / 30;
    const hz = (nameplate.poles * rpm) / 120;
    const r = 0.4 * (1 + 0.00393 * (statorC - 20));
    const x = 2 * Math.PI * hz * 0.003;
    // Unity power factor at the terminals: E² = (V + I·R)² + (I·X)².
    const v = Math.sqrt(emfPhase * emfPhase - (amps * x) ** 2) - amps * r;
    const vll = v * Math.sqrt(3);
    out.push({ ts: i * 10_000, rpm, hz, vab: vll, vbc: vll, vca: vll, ia: amps, ib: amps, ic: amps, kw: (Math.sqrt(3) * vll * amps) / 1000, statorC, ambientC: 5 });
  }
  return out;
}

describe('emfChart', () => {
  it('puts a healthy machine’s corrected points on the nameplate line at the chart temperature', () => {
    const chart = emfChart({ nameplate, samples: samples(1) });
    expect(chart.magnetSource).toBe('statorC');
    expect(chart.magnetC).toBe(samples(1).at(-1)!.statorC);
    for (const p of chart.points) expect(p.correctedV! / ((chart.lineKeVPerKrpm * p.rpm) / 1000)).toBeCloseTo(1, 6);
    // Under load the terminal voltage sits below the EMF of samples at the chart's own temperature.
    const sameTemp = chart.points.filter((_, i) => samples(1)[i]!.statorC === chart.magnetC);
    expect(sameTemp.length).toBeGreaterThan(10);
    expect(sameTemp.every((p) => p.terminalV < p.correctedV!)).toBe(true);
  });

  it('agrees with the diagnosis: the slope of the corrected points over the line is its Ke ratio', () => {
    const s = samples(0.92);
    const chart = emfChart({ nameplate, samples: s });
    const x = Float64Array.from(chart.points.map((p) => (chart.lineKeVPerKrpm * p.rpm) / 1000));
    const y = Float64Array.from(chart.points.map((p) => p.correctedV!));
    const fit = fitThroughOrigin(x, y, x.length)!;
    const diagnosis = diagnoseSamples({ nameplate, samples: s.map((p) => ({ ...p })) });
    expect(diagnosis.keRatio).not.toBeNull();
    expect(fit.slope).toBeCloseTo(diagnosis.keRatio!, 3);
    expect(fit.slope).toBeCloseTo(0.92, 3);
  });

  it('gives no corrected point below the speed floor and uses the reference temperature without readings', () => {
    const chart = emfChart({
      nameplate,
      samples: [{ ts: 0, rpm: 20, hz: null, vab: 20, vbc: null, vca: null, ia: null, ib: null, ic: null, kw: null, statorC: null, ambientC: null }],
    });
    expect(chart.points[0]!.correctedV).toBeUndefined();
    expect(chart.magnetSource).toBe('keRefC');
    expect(chart.lineKeVPerKrpm).toBe(1000);
  });
});
