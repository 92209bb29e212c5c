/**
 * The Ke fit over a track's used samples (contract, section 5). For each
 * sample the expected EMF x = Ke(magnet temperature)·speed/1000 and the
 * recovered EMF y = √3·|V + I·(R + jX)|; keRatio is the slope of y on x
 * through the origin. Beside it, from the same samples: the naive ratio of
 * terminal volts over sensor rpm, the unbalance, the Ke of each phase and the
 * size of the load and temperature corrections.
 */
import { SQRT3, lineEmfBehindTerminals, recoverPhaseEmfFast } from '@/lib/physics/emf';
import { keTemperatureFactorFast, remanenceCoeffPctPerC } from '@/lib/physics/magnet-temperature';
import { median } from '@/lib/physics/median';
import { negativeSequenceUnbalancePct } from '@/lib/physics/negative-sequence';
import { meanOfPhases } from '@/lib/physics/phase-mean';
import { phaseVoltsFromLines } from '@/lib/physics/phase-voltages';
import { powerFactorOfLoad } from '@/lib/physics/power-factor';
import { reactanceOhmFast } from '@/lib/physics/reactance';
import { electricalHz } from '@/lib/physics/synchronous-speed';
import { fitThroughOrigin } from '@/lib/physics/through-origin-fit';
import { lineVoltageUnbalancePct } from '@/lib/physics/unbalance';
import { copperOhmAtFast } from '@/lib/physics/winding-resistance';
import type { DiagnosisNameplate, TemperatureSource } from './nameplate';
import { magnetTempC, windingTempC } from './sample-emf';
import type { SampleColumns } from './sample-columns';
import type { Track } from './track';

/**
 * Past the remanence coefficient's linear range the temperature factor would
 * reach 0 and the fit divide by nothing; 5 % keeps it finite (our own floor).
 */
const MIN_TEMPERATURE_FACTOR = 0.05;

/** What the fit found; a figure is absent when no used sample carried what it needs. */
export interface KeFit {
  /** Slope of recovered over expected EMF and its 95 % interval: the keRatio. */
  readonly ke?: { readonly slope: number; readonly low: number; readonly high: number };
  /** Terminal volts per sensor rpm over nameplate Ke, nothing corrected. */
  readonly naive?: number;
  /** Median line-voltage unbalance (NEMA MG 1), %. */
  readonly unbalancePct?: number;
  /** Median negative-sequence unbalance (IEC 61000-4-30), %. */
  readonly negativeSequencePct?: number;
  /** Ke ratio of each phase, from phase voltages referred to the line triangle's centroid. */
  readonly phaseKe?: { readonly a: number; readonly b: number; readonly c: number };
  /** Share of used samples carrying current, %. */
  readonly loadedSharePct?: number;
  /** Mean EMF above terminal voltage over the loaded samples, %. */
  readonly loadCorrectionPct?: number;
  /** Mean magnet temperature of the used samples, °C, and where it came from. */
  readonly magnetMeanC?: number;
  readonly magnetTempSource?: TemperatureSource;
  /** Reversible remanence coefficient applied, % per °C. */
  readonly coeffPctPerC: number;
}

/** Running sums of the fit, one sample at a time (plain fields: this runs for every sample diagnosed). */
class FitSums {
  readonly x: Float64Array;
  readonly y: Float64Array;
  readonly unbalance: Float64Array;
  readonly negSeq: Float64Array;
  nUnbalance = 0;
  nNegSeq = 0;
  sxNaive = 0;
  sxxNaive = 0;
  sxPhaseA = 0;
  sxPhaseB = 0;
  sxPhaseC = 0;
  sxxPhase = 0;
  loaded = 0;
  correctionSum = 0;
  magnetSum = 0;
  fromStator = 0;
  fromAmbient = 0;

  constructor(m: number) {
    this.x = new Float64Array(m);
    this.y = new Float64Array(m);
    this.unbalance = new Float64Array(m);
    this.negSeq = new Float64Array(m);
  }
}

/**
 * The Ke fit and unbalance over a track's used samples.
 * @example fitTrack(track, cols, undefined, nameplate).ke?.slope // 0.998
 */
export function fitTrack(track: Track, cols: SampleColumns, order: Uint32Array | undefined, nameplate: DiagnosisNameplate): KeFit {
  const coeffPctPerC = remanenceCoeffPctPerC(nameplate.magnet, nameplate.magnetTempCoeffPctPerC);
  const m = track.count;
  if (m === 0) return { coeffPctPerC };
  const sums = new FitSums(m);
  const { rpm, hz, vab, vbc, vca, ia, ib, ic, kw, statorC, ambientC } = cols.columns;
  const keRef = nameplate.keVPerKrpm / 1000;
  const hzPerRpm = electricalHz(nameplate.poles, 1);
  for (let u = 0; u < m; u++) {
    const k = track.used[u] as number;
    const i = order === undefined ? k : (order[k] as number);
    const speed = track.speed[k] as number;
    const stator = statorC[i] as number;
    const ambient = ambientC[i] as number;
    const magnetC = magnetTempC(stator, ambient, nameplate.keRefC);
    if (stator === stator) sums.fromStator++;
    else if (ambient === ambient) sums.fromAmbient++;
    sums.magnetSum += magnetC;
    const tempFactor = Math.max(MIN_TEMPERATURE_FACTOR, keTemperatureFactorFast(coeffPctPerC, nameplate.keRefC, magnetC));
    const xi = keRef * tempFactor * speed;
    const a = vab[i] as number;
    const b = vbc[i] as number;
    const c = vca[i] as number;
    const vll = meanOfPhases(a, b, c);
    const current = meanOfPhases(ia[i] as number, ib[i] as number, ic[i] as number);
    const amps = current === current ? current : 0;
    const f = hz[i] === hz[i] ? (hz[i] as number) : hzPerRpm * speed;
    const ohm = copperOhmAtFast(nameplate.phaseOhm, windingTempC(stator, ambient));
    const xOhm = reactanceOhmFast(f, nameplate.phaseMh);
    const pf = powerFactorOfLoad(kw[i] as number, vll, amps);
    const emfLl = lineEmfBehindTerminals(vll, amps, ohm, xOhm, pf);
    sums.x[u] = xi;
    sums.y[u] = emfLl;
    // The naive measure: terminal volts over the sensor's rpm, nothing corrected.
    const sensorRpm = rpm[i] as number;
    if (sensorRpm === sensorRpm) {
      const naiveX = keRef * sensorRpm;
      sums.sxNaive += naiveX * vll;
      sums.sxxNaive += naiveX * naiveX;
    }
    if (amps > 0) {
      sums.loaded++;
      sums.correctionSum += emfLl / vll - 1;
    }
    if (a === a && b === b && c === c) {
      const pa = ia[i] as number;
      const pb = ib[i] as number;
      const pc = ic[i] as number;
      addLines(sums, a, b, c, xi, pa === pa ? pa : amps, pb === pb ? pb : amps, pc === pc ? pc : amps, ohm, xOhm, pf);
    }
  }
  return keFitOf(sums, m, coeffPctPerC);
}

/** Adds a sample that carries all three line voltages to the unbalance and per-phase sums. */
function addLines(sums: FitSums, a: number, b: number, c: number, xi: number, pa: number, pb: number, pc: number, ohm: number, xOhm: number, pf: number): void {
  const pct = lineVoltageUnbalancePct(a, b, c);
  if (pct !== undefined) sums.unbalance[sums.nUnbalance++] = pct;
  const u2 = negativeSequenceUnbalancePct(a, b, c);
  if (u2 !== undefined) sums.negSeq[sums.nNegSeq++] = u2;
  const phases = phaseVoltsFromLines(a, b, c);
  if (phases === undefined) return;
  sums.sxPhaseA += xi * SQRT3 * recoverPhaseEmfFast(phases[0], pa, ohm, xOhm, pf);
  sums.sxPhaseB += xi * SQRT3 * recoverPhaseEmfFast(phases[1], pb, ohm, xOhm, pf);
  sums.sxPhaseC += xi * SQRT3 * recoverPhaseEmfFast(phases[2], pc, ohm, xOhm, pf);
  sums.sxxPhase += xi * xi;
}

/** The fit's figures from its sums over `m` used samples. */
function keFitOf(sums: FitSums, m: number, coeffPctPerC: number): KeFit {
  const ke = fitThroughOrigin(sums.x, sums.y, m);
  const { fromStator, fromAmbient } = sums;
  return {
    coeffPctPerC,
    ...(ke === undefined ? {} : { ke: { slope: ke.slope, low: ke.low, high: ke.high } }),
    ...(sums.sxxNaive > 0 ? { naive: sums.sxNaive / sums.sxxNaive } : {}),
    // Medians over the used samples that carry all three line voltages.
    ...(sums.nUnbalance > 0 ? { unbalancePct: median(sums.unbalance, sums.nUnbalance) } : {}),
    ...(sums.nNegSeq > 0 ? { negativeSequencePct: median(sums.negSeq, sums.nNegSeq) } : {}),
    ...(sums.sxxPhase > 0 ? { phaseKe: { a: sums.sxPhaseA / sums.sxxPhase, b: sums.sxPhaseB / sums.sxxPhase, c: sums.sxPhaseC / sums.sxxPhase } } : {}),
    loadedSharePct: (100 * sums.loaded) / m,
    ...(sums.loaded > 0 ? { loadCorrectionPct: (100 * sums.correctionSum) / sums.loaded } : {}),
    magnetMeanC: sums.magnetSum / m,
    magnetTempSource: fromStator === m ? 'statorC' : fromAmbient === m ? 'ambientC' : fromStator + fromAmbient === 0 ? 'keRefC' : 'mixed',
  };
}
