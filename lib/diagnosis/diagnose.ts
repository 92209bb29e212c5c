/**
 * Diagnosis of one unit from its samples (contract, section 5): the
 * load- and temperature-corrected EMF constant against the nameplate, the
 * line-voltage unbalance and the speed-sensor cross-check, and a verdict with
 * findings. The command line runs it over a whole log, the live diagnosis
 * over a window of each unit's recent samples. The numbers are judge()'s, the
 * words the finding builders'; this puts them into the contract's result.
 */
import { findingsOf, sortFindings, type Finding } from './findings';
import { judge, type JudgeInput, type Judgement, type TemperatureSource, type Verdict } from './judge';
import type { ResolvedLimits } from './limits';

export { VERDICTS, type DiagnosisNameplate, type TemperatureSource, type Verdict } from './judge';

/** Figures behind the verdict, beyond the contract's fields. */
export interface DiagnosisDetails {
  /** Samples given. */
  readonly samplesTotal: number;
  /** Samples below the speed floor (minSpeedFraction of ratedRpm). */
  readonly samplesBelowSpeed: number;
  /** Samples at speed but in a speed transient. */
  readonly samplesInTransient: number;
  /** Samples at speed reading 0 V on every line given. */
  readonly samplesWithoutVoltage: number;
  /** Samples without `hz` when speed comes from frequency. */
  readonly samplesWithoutHz: number;
  /** Which reading gave the speed of the Ke fit. */
  readonly speedSource: 'rpm' | 'hz';
  /** Speed range of the used samples, rev/min. */
  readonly speedMinRpm: number | null;
  readonly speedMaxRpm: number | null;
  /** Nameplate Ke at keRefC, V per 1000 rpm (line-to-line). */
  readonly keNameplateVPerKrpm: number;
  /** Measured Ke referred to keRefC, V per 1000 rpm: keRatio × nameplate. */
  readonly keMeasuredVPerKrpm: number | null;
  /** Terminal volts per sensor rpm over nameplate Ke, with no load, temperature or speed correction (for comparison). */
  readonly naiveKeRatio: number | null;
  /** Share of used samples carrying current, %. */
  readonly loadedSharePct: number | null;
  /** Mean EMF above terminal voltage over the loaded samples, %: the size of the load correction. */
  readonly loadCorrectionPct: number | null;
  /** Mean magnet temperature of the used samples, °C, and where it came from. */
  readonly magnetMeanC: number | null;
  readonly magnetTempSource: TemperatureSource | null;
  /** Reversible remanence coefficient applied, % per °C. */
  readonly magnetCoeffPctPerC: number;
  /** IEC 61000-4-30 negative-sequence unbalance, median over used samples, %. */
  readonly negativeSequencePct: number | null;
  /** Ke ratio of each phase (phase voltages referred to the line-voltage triangle's centroid); null without all three lines. */
  readonly phaseKeRatio: { readonly a: number; readonly b: number; readonly c: number } | null;
  /** Time range of the used samples, ISO-8601 UTC. */
  readonly fromTs: string | null;
  readonly toTs: string | null;
  /** Thresholds applied. */
  readonly limits: ResolvedLimits;
}

/** The check result (contract, section 4) plus `details`. */
export interface DiagnosisResult {
  readonly samplesUsed: number;
  readonly keRatio: number | null;
  readonly keRatioLow: number | null;
  readonly keRatioHigh: number | null;
  readonly unbalancePct: number | null;
  readonly speedRatio: number | null;
  readonly verdict: Verdict;
  readonly findings: Finding[];
  readonly details: DiagnosisDetails;
}

/** Input of {@link diagnoseSamples}. */
export interface DiagnoseInput extends JudgeInput {
  /** Findings of the caller (rows skipped, unknown columns), sorted in with the diagnosis's own. */
  readonly extraFindings?: readonly Finding[];
}

/**
 * Diagnoses a unit from its samples; never throws on data, only on a programmer error.
 * @example diagnoseSamples({ nameplate, samples }).verdict // 'healthy'
 */
export function diagnoseSamples(input: DiagnoseInput): DiagnosisResult {
  const judgement = judge(input);
  return resultOf(judgement, sortFindings([...(input.extraFindings ?? []), ...findingsOf(judgement)]));
}

/**
 * The check result of a judgement with its findings (contract, section 4).
 * @example resultOf(judge({ nameplate, samples }), []).samplesUsed // 720
 */
export function resultOf(j: Judgement, findings: Finding[]): DiagnosisResult {
  const { track, fit, nameplate } = j;
  const keRatio = fit.ke?.slope;
  return {
    samplesUsed: track.count,
    keRatio: keRatio ?? null,
    keRatioLow: fit.ke?.low ?? null,
    keRatioHigh: fit.ke?.high ?? null,
    unbalancePct: fit.unbalancePct ?? null,
    speedRatio: j.speedRatio ?? null,
    verdict: j.verdict,
    findings,
    details: {
      samplesTotal: j.samplesTotal,
      samplesBelowSpeed: track.belowSpeed,
      samplesInTransient: track.inTransient,
      samplesWithoutVoltage: track.withoutVoltage,
      samplesWithoutHz: track.source === 'hz' ? track.missing : 0,
      speedSource: track.source,
      speedMinRpm: track.count > 0 ? track.minRpm : null,
      speedMaxRpm: track.count > 0 ? track.maxRpm : null,
      keNameplateVPerKrpm: nameplate.keVPerKrpm,
      keMeasuredVPerKrpm: keRatio === undefined ? null : keRatio * nameplate.keVPerKrpm,
      naiveKeRatio: fit.naive ?? null,
      loadedSharePct: fit.loadedSharePct ?? null,
      loadCorrectionPct: fit.loadCorrectionPct ?? null,
      magnetMeanC: fit.magnetMeanC ?? null,
      magnetTempSource: fit.magnetTempSource ?? null,
      magnetCoeffPctPerC: fit.coeffPctPerC,
      negativeSequencePct: fit.negativeSequencePct ?? null,
      phaseKeRatio: fit.phaseKe ?? null,
      fromTs: j.usedFromTs ?? null,
      toTs: j.usedToTs ?? null,
      limits: j.limits,
    },
  };
}
