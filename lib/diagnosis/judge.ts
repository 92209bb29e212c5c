/**
 * The numbers of a diagnosis (contract, section 5): from a unit's samples and
 * nameplate to the speed reading trusted, the load- and temperature-corrected
 * EMF constant against the nameplate with its interval, the line-voltage
 * unbalance, the overspeed run and the verdict. Pure: no words, no I/O. The
 * findings (lib/diagnosis/findings/) put the judgement into words;
 * diagnoseSamples composes the two.
 */
import type { DiagnosisLimits } from '@/lib/contract/nameplate';
import { fitTrack, type KeFit } from './ke-fit';
import { resolveLimits, unbalanceIsAlarm, type ResolvedLimits } from './limits';
import { overspeedRun, type OverspeedRun } from './overspeed-run';
import { SampleColumns, type DiagnosisSample } from './sample-columns';
import { medianSpeedRatio, selectTrack, timeOrder, usedTimeRange, type Track, type TrackCounts } from './track';

export const VERDICTS = ['healthy', 'demagnetised', 'shorted-turns', 'speed-sensor-fault', 'insufficient-data'] as const;
export type Verdict = (typeof VERDICTS)[number];

export type { DiagnosisNameplate, TemperatureSource } from './nameplate';
import type { DiagnosisNameplate } from './nameplate';

/** Input of {@link judge}. */
export interface JudgeInput {
  readonly nameplate: DiagnosisNameplate;
  /** Samples of the unit in any order; a SampleColumns store avoids one object per sample. */
  readonly samples: readonly DiagnosisSample[] | SampleColumns;
  /** Thresholds over the nameplate's own. */
  readonly limits?: DiagnosisLimits;
}

/** What the numbers say about one unit: every fact a finding or the check result is built from. */
export interface Judgement {
  readonly nameplate: DiagnosisNameplate;
  /** Thresholds applied. */
  readonly limits: ResolvedLimits;
  /** Samples given. */
  readonly samplesTotal: number;
  /** The samples the verdict rests on: which speed reading, how many used, why the others were not. */
  readonly track: TrackCounts;
  /** Median terminal frequency over the sensor's equivalent; undefined without both readings, or with a dead sensor. */
  readonly speedRatio: number | undefined;
  /** The speed sensor disagrees with the terminal frequency beyond the tolerance: speed comes from the frequency. */
  readonly sensorFault: boolean;
  /** Too few used samples, or all at about one speed: no verdict on the machine. */
  readonly insufficient: boolean;
  /** Speed range of the used samples, rev/min (0 without any). */
  readonly speedSpanRpm: number;
  /** The Ke fit, unbalance and corrections over the used samples. */
  readonly fit: KeFit;
  /** The phase whose Ke ratio stands out below the other two. */
  readonly weakestPhase: 'a' | 'b' | 'c' | undefined;
  /** Samples above the overspeed limit, over all samples given. */
  readonly overspeed: OverspeedRun | undefined;
  /** Times of the first and last used sample, ISO-8601 UTC. */
  readonly usedFromTs: string | undefined;
  readonly usedToTs: string | undefined;
  readonly verdict: Verdict;
}

/**
 * Judges a unit from its samples; never throws on data, only on a programmer error.
 * @example judge({ nameplate, samples }).verdict // 'healthy'
 */
export function judge(input: JudgeInput): Judgement {
  const { nameplate } = input;
  if (!(nameplate.ratedRpm > 0)) throw new RangeError(`nameplate.ratedRpm must be above 0, got ${nameplate.ratedRpm}`);
  if (!(nameplate.keVPerKrpm > 0)) throw new RangeError(`nameplate.keVPerKrpm must be above 0, got ${nameplate.keVPerKrpm}`);
  const limits = resolveLimits(nameplate.diagnosis, input.limits);
  const cols = input.samples instanceof SampleColumns ? input.samples : SampleColumns.from(input.samples);
  const order = timeOrder(cols.ts, cols.length);
  const { track, speedRatio, sensorFault } = judgeSpeed(cols, order, nameplate, limits);
  const fit = fitTrack(track, cols, order, nameplate);
  const speedSpanRpm = track.count > 0 ? track.maxRpm - track.minRpm : 0;
  const insufficient = track.count < limits.minSamples || speedSpanRpm < limits.minSpeedSpanFraction * nameplate.ratedRpm;
  const used = usedTimeRange(track, cols, order);
  return {
    nameplate,
    limits,
    samplesTotal: cols.length,
    track: countsOf(track),
    speedRatio,
    sensorFault,
    insufficient,
    speedSpanRpm,
    fit,
    weakestPhase: fit.phaseKe === undefined ? undefined : weakestPhase(fit.phaseKe),
    overspeed: overspeedRun(cols, order, nameplate, sensorFault),
    usedFromTs: used?.[0],
    usedToTs: used?.[1],
    verdict: verdictOf({ insufficient, sensorFault, keRatio: fit.ke?.slope, unbalancePct: fit.unbalancePct, limits }),
  };
}

/**
 * The verdict from the judged figures, in the contract's order of precedence:
 * no verdict without enough data, then the speed sensor, shorted turns, weakened magnets.
 * @example verdictOf({ insufficient: false, sensorFault: false, keRatio: 0.9, unbalancePct: 0.3, limits: DEFAULT_LIMITS }) // 'demagnetised'
 */
export function verdictOf(p: {
  readonly insufficient: boolean;
  readonly sensorFault: boolean;
  readonly keRatio: number | undefined;
  readonly unbalancePct: number | undefined;
  readonly limits: ResolvedLimits;
}): Verdict {
  if (p.insufficient) return 'insufficient-data';
  if (p.sensorFault) return 'speed-sensor-fault';
  if (unbalanceIsAlarm(p.unbalancePct, p.limits)) return 'shorted-turns';
  if (p.keRatio !== undefined && p.keRatio < p.limits.keAlarmRatio) return 'demagnetised';
  return 'healthy';
}

/**
 * The phase whose Ke ratio is lowest, when it stands out from the other two by more than 0.005.
 * @example weakestPhase({ a: 1, b: 0.94, c: 1 }) // 'b'
 */
export function weakestPhase(ke: { readonly a: number; readonly b: number; readonly c: number }): 'a' | 'b' | 'c' | undefined {
  const entries = [['a', ke.a], ['b', ke.b], ['c', ke.c]] as const;
  const sorted = [...entries].sort((x, y) => x[1] - y[1]);
  const [low, mid] = sorted as unknown as [readonly ['a' | 'b' | 'c', number], readonly ['a' | 'b' | 'c', number]];
  // Only name a phase that stands out from the other two.
  return mid[1] - low[1] > 0.005 ? low[0] : undefined;
}

/**
 * Speed: the sensor unless the frequency says it is wrong (contract, section
 * 5). The frequency's track is read only when the sensor's is suspect or too
 * thin; a sensor reading too low for the speed floor while the frequency says
 * the machine turns is a fault too.
 */
function judgeSpeed(
  cols: SampleColumns,
  order: Uint32Array | undefined,
  nameplate: DiagnosisNameplate,
  limits: ResolvedLimits,
): { track: Track; speedRatio: number | undefined; sensorFault: boolean } {
  const tolerance = limits.speedRatioTolerance;
  const rpmTrack = selectTrack('rpm', cols, order, nameplate, limits);
  let speedRatio = medianSpeedRatio(rpmTrack, cols, order, nameplate.poles, false);
  let sensorFault = speedRatio !== undefined && Math.abs(speedRatio - 1) > tolerance;
  if (!sensorFault && rpmTrack.count >= limits.minSamples) return { track: rpmTrack, speedRatio, sensorFault };
  const hzTrack = selectTrack('hz', cols, order, nameplate, limits);
  if (!sensorFault && hzTrack.count >= limits.minSamples) {
    const inverse = medianSpeedRatio(hzTrack, cols, order, nameplate.poles, true);
    if (inverse !== undefined && Math.abs(inverse - 1) > tolerance) {
      sensorFault = true;
      speedRatio = inverse > 0 ? 1 / inverse : undefined;
    }
  }
  return { track: sensorFault ? hzTrack : rpmTrack, speedRatio, sensorFault };
}

function countsOf(track: Track): TrackCounts {
  const { source, count, belowSpeed, inTransient, withoutVoltage, missing, minRpm, maxRpm } = track;
  return { source, count, belowSpeed, inTransient, withoutVoltage, missing, minRpm, maxRpm };
}
