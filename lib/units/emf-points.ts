/**
 * The evidence of the voltage-against-speed chart: per sample the terminal
 * line voltage, and the open-circuit EMF behind it corrected for load and
 * moved to one magnet temperature, beside the nameplate line at that
 * temperature. The corrections are the diagnosis's (contract, section 5),
 * built from the same lib/physics functions; a healthy unit's corrected points
 * lie on the line, a weakened one's below it.
 */
import type { DiagnosisNameplate } from '@/lib/diagnosis/diagnose';
import { resolveLimits } from '@/lib/diagnosis/limits';
import { lineEmfBehindTerminals } from '@/lib/physics/emf';
import { keTemperatureFactor, keTemperatureFactorFast, remanenceCoeffPctPerC } from '@/lib/physics/magnet-temperature';
import { meanOfPhases } from '@/lib/physics/phase-mean';
import { powerFactorOfLoad } from '@/lib/physics/power-factor';
import { reactanceOhmFast } from '@/lib/physics/reactance';
import { electricalHz } from '@/lib/physics/synchronous-speed';
import { copperOhmAtFast } from '@/lib/physics/winding-resistance';
import { magnetTempC, windingTempC } from '@/lib/diagnosis/sample-emf';

/** The sample fields the chart needs (absent values null). */
export interface EmfSample {
  readonly ts: number;
  readonly rpm: number | null;
  readonly hz: number | null;
  readonly vab: number | null;
  readonly vbc: number | null;
  readonly vca: number | null;
  readonly ia: number | null;
  readonly ib: number | null;
  readonly ic: number | null;
  readonly kw: number | null;
  readonly statorC: number | null;
  readonly ambientC: number | null;
}

/** One point of the chart. */
export interface EmfPoint {
  readonly ts: number;
  /** Shaft speed, rev/min (from `hz` when the diagnosis judged the sensor faulty). */
  readonly rpm: number;
  /** Terminal line-to-line voltage, mean of the lines given, V. */
  readonly terminalV: number;
  /** Open-circuit line EMF behind the terminals, at the chart's magnet temperature, V; undefined below the speed floor. */
  readonly correctedV: number | undefined;
}

export interface EmfChart {
  readonly points: EmfPoint[];
  /** Magnet temperature the line and corrected points refer to, °C, and where it came from. */
  readonly magnetC: number;
  readonly magnetSource: 'statorC' | 'ambientC' | 'keRefC';
  /** Nameplate Ke moved to `magnetC`, V per 1000 rpm. */
  readonly lineKeVPerKrpm: number;
  /** Samples below this speed are not used by the diagnosis and carry no corrected point, rev/min. */
  readonly speedFloorRpm: number;
}

const finite = (v: number | null | undefined): v is number => v !== null && v !== undefined && Number.isFinite(v);

/**
 * Terminal and corrected EMF points of samples (time order), and the nameplate
 * line at the newest sample's magnet temperature.
 * @example emfChart({ nameplate, samples }).lineKeVPerKrpm // nameplate Ke at the latest statorC
 */
export function emfChart({
  nameplate,
  samples,
  speedFrom = 'rpm',
}: {
  nameplate: DiagnosisNameplate;
  samples: readonly EmfSample[];
  /** 'hz' when the diagnosis took speed from the frequency (a faulty sensor). */
  speedFrom?: 'rpm' | 'hz';
}): EmfChart {
  const coeff = remanenceCoeffPctPerC(nameplate.magnet, nameplate.magnetTempCoeffPctPerC);
  const limits = resolveLimits(nameplate.diagnosis);
  const speedFloorRpm = limits.minSpeedFraction * nameplate.ratedRpm;
  // The chart's temperature: the newest sample that has one (stator, else ambient), else the nameplate's reference.
  let magnetC = nameplate.keRefC;
  let magnetSource: EmfChart['magnetSource'] = 'keRefC';
  for (let i = samples.length - 1; i >= 0; i--) {
    const s = samples[i] as EmfSample;
    if (finite(s.statorC)) {
      magnetC = s.statorC;
      magnetSource = 'statorC';
      break;
    }
    if (finite(s.ambientC)) {
      magnetC = s.ambientC;
      magnetSource = 'ambientC';
      break;
    }
  }
  const chartFactor = keTemperatureFactor(coeff, nameplate.keRefC, magnetC);
  const points: EmfPoint[] = [];
  for (const s of samples) {
    const speed = speedFrom === 'hz' ? (finite(s.hz) ? (s.hz * 120) / nameplate.poles : undefined) : finite(s.rpm) ? s.rpm : undefined;
    const vll = meanOfPhases(s.vab ?? Number.NaN, s.vbc ?? Number.NaN, s.vca ?? Number.NaN);
    if (speed === undefined || !(vll > 0) || speed < 0) continue;
    let correctedV: number | undefined;
    if (speed >= speedFloorRpm) {
      const current = meanOfPhases(s.ia ?? Number.NaN, s.ib ?? Number.NaN, s.ic ?? Number.NaN);
      const amps = current === current ? current : 0;
      const statorC = s.statorC ?? Number.NaN;
      const ambientC = s.ambientC ?? Number.NaN;
      const sampleMagnetC = magnetTempC(statorC, ambientC, nameplate.keRefC);
      const hz = finite(s.hz) ? s.hz : electricalHz(nameplate.poles, speed);
      const ohm = copperOhmAtFast(nameplate.phaseOhm, windingTempC(statorC, ambientC));
      const pf = powerFactorOfLoad(s.kw ?? Number.NaN, vll, amps);
      const emfLl = lineEmfBehindTerminals(vll, amps, ohm, reactanceOhmFast(hz, nameplate.phaseMh), pf);
      // Past the coefficient's linear range keep the point out rather than divide by nothing.
      const sampleFactor = keTemperatureFactorFast(coeff, nameplate.keRefC, sampleMagnetC);
      if (sampleFactor > 0.05) correctedV = (emfLl * chartFactor) / sampleFactor;
    }
    points.push({ ts: s.ts, rpm: speed, terminalV: vll, correctedV });
  }
  return { points, magnetC, magnetSource, lineKeVPerKrpm: nameplate.keVPerKrpm * chartFactor, speedFloorRpm };
}
