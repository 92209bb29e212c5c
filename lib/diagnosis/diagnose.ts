/**
 * Diagnosis of one unit from its samples (contract, section 5): the
 * load- and temperature-corrected EMF constant against the nameplate, the
 * line-voltage unbalance and the speed-sensor cross-check, and a verdict with
 * findings. The command line runs it over a whole log, the live diagnosis
 * over a window of each unit's recent samples.
 */
import type { DiagnosisLimits, MagnetMaterial } from '@/lib/contract/nameplate';
import { SQRT3, recoverPhaseEmfFast } from '@/lib/physics/emf';
import { remanenceCoeffPctPerC } from '@/lib/physics/magnet-temperature';
import { median } from '@/lib/physics/median';
import { negativeSequenceUnbalancePct } from '@/lib/physics/negative-sequence';
import { meanOfPhases } from '@/lib/physics/phase-mean';
import { phaseVoltsFromLines } from '@/lib/physics/phase-voltages';
import { rpmFromHz } from '@/lib/physics/synchronous-speed';
import { fitThroughOrigin } from '@/lib/physics/through-origin-fit';
import { lineVoltageUnbalancePct } from '@/lib/physics/unbalance';
import { lineEmfBehindTerminals, loadPowerFactor, magnetTempC, windingOhm, windingTempC } from './sample-emf';
import { SampleColumns, type DiagnosisSample } from './sample-columns';
import { OVERSPEED_GAP_S, resolveLimits, TRANSIENT_NEIGHBOUR_MAX_S, type ResolvedLimits } from './limits';
import { durationWords, finding, num, pctFromOne, sortFindings, type Finding } from './findings';

export const VERDICTS = ['healthy', 'demagnetised', 'shorted-turns', 'speed-sensor-fault', 'insufficient-data'] as const;
export type Verdict = (typeof VERDICTS)[number];

/** The nameplate fields the diagnosis reads (a validated Nameplate fits). */
export interface DiagnosisNameplate {
  readonly ratedRpm: number;
  /** Overspeed limit, rev/min. */
  readonly maxRpm: number;
  readonly poles: number;
  readonly keVPerKrpm: number;
  readonly keRefC: number;
  readonly magnet: MagnetMaterial;
  readonly magnetTempCoeffPctPerC?: number | undefined;
  readonly phaseOhm: number;
  readonly phaseMh: number;
  readonly diagnosis?: DiagnosisLimits | undefined;
}

/** Where the magnet temperature of the used samples came from. */
export type TemperatureSource = 'statorC' | 'ambientC' | 'keRefC' | 'mixed';

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
export interface DiagnoseInput {
  readonly nameplate: DiagnosisNameplate;
  /** Samples of the unit in any order; a SampleColumns store avoids one object per sample. */
  readonly samples: readonly DiagnosisSample[] | SampleColumns;
  /** Thresholds over the nameplate's own. */
  readonly limits?: DiagnosisLimits;
  /** Findings of the caller (rows skipped, unknown columns), sorted in with the diagnosis's own. */
  readonly extraFindings?: readonly Finding[];
}

/** Samples of one speed source that pass the filters, as positions in time order. */
interface Track {
  readonly source: 'rpm' | 'hz';
  readonly speed: Float64Array;
  readonly used: Uint32Array;
  readonly count: number;
  readonly belowSpeed: number;
  readonly inTransient: number;
  readonly withoutVoltage: number;
  readonly missing: number;
  readonly minRpm: number;
  readonly maxRpm: number;
}

/** Positions of the samples in time order; undefined when they already are. */
function timeOrder(ts: Float64Array, n: number): Uint32Array | undefined {
  let sorted = true;
  for (let i = 1; i < n; i++) {
    if ((ts[i] as number) < (ts[i - 1] as number)) {
      sorted = false;
      break;
    }
  }
  if (sorted) return undefined;
  const order = new Uint32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  order.sort((a, b) => (ts[a] as number) - (ts[b] as number) || a - b);
  return order;
}

function selectTrack(
  source: 'rpm' | 'hz',
  cols: SampleColumns,
  order: Uint32Array | undefined,
  nameplate: DiagnosisNameplate,
  limits: ResolvedLimits,
): Track {
  const n = cols.length;
  const { rpm, hz, vab, vbc, vca } = cols.columns;
  const speed = new Float64Array(n);
  const hzToRpm = rpmFromHz(nameplate.poles, 1);
  for (let k = 0; k < n; k++) {
    const i = order === undefined ? k : (order[k] as number);
    speed[k] = source === 'rpm' ? (rpm[i] as number) : (hz[i] as number) * hzToRpm;
  }
  const floor = limits.minSpeedFraction * nameplate.ratedRpm;
  const maxRate = limits.maxSpeedRateFractionPerS * nameplate.ratedRpm;
  const used = new Uint32Array(n);
  let count = 0;
  let belowSpeed = 0;
  let inTransient = 0;
  let withoutVoltage = 0;
  let missing = 0;
  let minRpm = Infinity;
  let maxRpm = -Infinity;
  let prev = -1;
  for (let k = 0; k < n; k++) {
    const s = speed[k] as number;
    if (s !== s) {
      missing++;
      continue;
    }
    // Nearest neighbours in time that carry this speed reading.
    let next = k + 1;
    while (next < n && (speed[next] as number) !== (speed[next] as number)) next++;
    const here = k;
    const thisPrev = prev;
    prev = k;
    if (s < floor) {
      belowSpeed++;
      continue;
    }
    const i = order === undefined ? here : (order[here] as number);
    if (!(meanOfPhases(vab[i] as number, vbc[i] as number, vca[i] as number) > 0)) {
      withoutVoltage++;
      continue;
    }
    const tsHere = cols.ts[i] as number;
    let transient = false;
    for (const other of [thisPrev, next]) {
      if (other < 0 || other >= n) continue;
      const j = order === undefined ? other : (order[other] as number);
      const dtS = Math.abs((cols.ts[j] as number) - tsHere) / 1000;
      if (dtS === 0 || dtS > TRANSIENT_NEIGHBOUR_MAX_S) continue;
      if (Math.abs((speed[other] as number) - s) / dtS > maxRate) transient = true;
    }
    if (transient) {
      inTransient++;
      continue;
    }
    used[count++] = here;
    if (s < minRpm) minRpm = s;
    if (s > maxRpm) maxRpm = s;
  }
  return { source, speed, used, count, belowSpeed, inTransient, withoutVoltage, missing, minRpm, maxRpm };
}

/** Median of hz / (poles·rpm/120) over the track's samples that carry both. */
function medianSpeedRatio(track: Track, cols: SampleColumns, order: Uint32Array | undefined, poles: number, invert: boolean): number | undefined {
  const ratios = new Float64Array(track.count);
  let m = 0;
  const { rpm, hz } = cols.columns;
  for (let u = 0; u < track.count; u++) {
    const k = track.used[u] as number;
    const i = order === undefined ? k : (order[k] as number);
    const f = hz[i] as number;
    const r = rpm[i] as number;
    if (f !== f || r !== r) continue;
    const fromRpm = (poles * r) / 120;
    if (invert) {
      if (f > 0) ratios[m++] = fromRpm / f;
    } else if (fromRpm > 0) ratios[m++] = f / fromRpm;
  }
  return median(ratios, m);
}

/**
 * Diagnoses a unit from its samples; never throws on data, only on a programmer error.
 * @example diagnoseSamples({ nameplate, samples }).verdict // 'healthy'
 */
export function diagnoseSamples(input: DiagnoseInput): DiagnosisResult {
  const { nameplate } = input;
  if (!(nameplate.ratedRpm > 0)) throw new RangeError(`nameplate.ratedRpm must be above 0, got ${nameplate.ratedRpm}`);
  if (!(nameplate.keVPerKrpm > 0)) throw new RangeError(`nameplate.keVPerKrpm must be above 0, got ${nameplate.keVPerKrpm}`);
  const limits = resolveLimits(nameplate.diagnosis, input.limits);
  const cols = input.samples instanceof SampleColumns ? input.samples : SampleColumns.from(input.samples);
  const n = cols.length;
  const order = timeOrder(cols.ts, n);
  const findings: Finding[] = [...(input.extraFindings ?? [])];
  const tolerance = limits.speedRatioTolerance;

  // Speed: the sensor unless the frequency says it is wrong (contract, section 5).
  const rpmTrack = selectTrack('rpm', cols, order, nameplate, limits);
  let speedRatio = medianSpeedRatio(rpmTrack, cols, order, nameplate.poles, false);
  let track = rpmTrack;
  let sensorFault = speedRatio !== undefined && Math.abs(speedRatio - 1) > tolerance;
  let hzTrack: Track | undefined;
  if (sensorFault || rpmTrack.count < limits.minSamples) {
    hzTrack = selectTrack('hz', cols, order, nameplate, limits);
    if (!sensorFault && hzTrack.count >= limits.minSamples) {
      // The sensor reads too low for the floor while the frequency says the machine turns.
      const inverse = medianSpeedRatio(hzTrack, cols, order, nameplate.poles, true);
      if (inverse !== undefined && Math.abs(inverse - 1) > tolerance) {
        sensorFault = true;
        speedRatio = inverse > 0 ? 1 / inverse : undefined;
      }
    }
    if (sensorFault) track = hzTrack;
  }

  const fit = fitTrack(track, cols, order, nameplate);
  const span = track.count > 0 ? track.maxRpm - track.minRpm : 0;
  const insufficient = track.count < limits.minSamples || span < limits.minSpeedSpanFraction * nameplate.ratedRpm;
  const keRatio = fit.ke?.slope;
  const unbalancePct = fit.unbalancePct;

  let verdict: Verdict;
  if (insufficient) verdict = 'insufficient-data';
  else if (sensorFault) verdict = 'speed-sensor-fault';
  else if (unbalancePct !== undefined && unbalancePct > limits.unbalanceAlarmPct) verdict = 'shorted-turns';
  else if (keRatio !== undefined && keRatio < limits.keAlarmRatio) verdict = 'demagnetised';
  else verdict = 'healthy';

  const floorRpm = limits.minSpeedFraction * nameplate.ratedRpm;
  const spanNeeded = limits.minSpeedSpanFraction * nameplate.ratedRpm;
  const speedWord = track.source === 'hz' ? 'speed from the terminal frequency' : 'speed';
  if (insufficient) {
    if (track.count >= limits.minSamples) {
      // Enough samples, all at about one speed: a slope through one speed is not defined.
      findings.push(
        finding(
          'insufficient-data',
          'warning',
          `The unit ran at one steady speed: the ${num(track.count)} usable samples lie between ${num(track.minRpm)} and ${num(track.maxRpm)} rpm, ` +
            `a range of ${num(span)} rpm, and the diagnosis needs at least ${num(spanNeeded)} rpm (${num(limits.minSpeedSpanFraction * 100)} % of rated). ` +
            'Ke is the slope of voltage against speed, and one speed gives no slope: a unit held at constant speed by a load controller always reads like this, and more hours at that speed will not help.',
          {
            next:
              'Judge it from a log that includes a start-up or a run-down, which sweeps the speed through its range: ' +
              "download one from the unit's controller after a normal start or stop and run `millrace check` on it. " +
              'Do not change speed or open the load on purpose to make one.',
          },
        ),
      );
    } else {
      findings.push(
        finding(
          'insufficient-data',
          'warning',
          `Only ${num(track.count)} samples were usable; the diagnosis needs at least ${num(limits.minSamples)} with the ${speedWord} ` +
            `above ${num(floorRpm)} rpm (${num(limits.minSpeedFraction * 100)} % of rated), spread over at least ${num(spanNeeded)} rpm.`,
          { next: 'Wait for the unit to run above that speed for a while, or check a longer log that covers more of its running.' },
        ),
      );
    }
  }
  if (track.belowSpeed + track.inTransient + track.withoutVoltage + track.missing > 0) {
    const parts = [
      track.belowSpeed > 0 ? `${num(track.belowSpeed)} below ${num(floorRpm)} rpm` : '',
      track.inTransient > 0
        ? `${num(track.inTransient)} while the speed changed quickly (faster than ${num(limits.maxSpeedRateFractionPerS * nameplate.ratedRpm, 1)} rpm a second)`
        : '',
      track.missing > 0 ? `${num(track.missing)} without a ${track.source === 'hz' ? 'frequency' : 'speed'} reading` : '',
    ].filter(Boolean);
    if (parts.length > 0) {
      findings.push(finding('samples-filtered', 'info', `${num(track.count)} of ${num(n)} samples used; not used: ${parts.join(', ')}.`));
    }
  }
  if (track.withoutVoltage > 0) {
    findings.push(
      finding(
        'no-voltage-at-speed',
        'warning',
        `${num(track.withoutVoltage)} samples read 0 V on every line while turning above ${num(floorRpm)} rpm; they were not used. ` +
          'A turning permanent-magnet generator always makes voltage, so the measurement is wrong, not the machine.',
        {
          next: 'Check the voltage transducers, their fuses and wiring in the cabinet; the terminals are live whenever the shaft turns.',
          onSite: true,
        },
      ),
    );
  }

  const overspeed = overspeedRun(cols, order, nameplate, sensorFault);
  if (overspeed !== undefined) {
    findings.push(
      finding(
        'overspeed',
        'alarm',
        `${num(overspeed.samples)} sample${overspeed.samples === 1 ? '' : 's'} above the ${num(nameplate.maxRpm)} rpm overspeed limit` +
          `${sensorFault ? ' (speed from the terminal frequency, as the speed sensor is suspect)' : ''}; ` +
          `highest ${num(overspeed.peakRpm)} rpm (${pctFromOne(overspeed.peakRpm / nameplate.maxRpm)} against the limit) at ${overspeed.peakTs}; ` +
          `about ${durationWords(overspeed.seconds)} above the limit in all, between ${overspeed.firstTs} and ${overspeed.lastTs}.`,
        {
          next:
            'Stop the unit by its remote or automatic means. Do not approach it until the rotor or runner is secured. ' +
            'Before a restart, have the blades or runner, the bearings and the overspeed protection (brake, furling, dump load or governor) inspected by qualified people.',
          onSite: true,
        },
      ),
    );
  }

  if (sensorFault) {
    // speedRatio is undefined here only when the sensor reads zero while the frequency shows the machine turning.
    const dead = speedRatio === undefined;
    const readsLow = dead || (speedRatio as number) > 1;
    const observed = dead
      ? `The speed sensor reads 0 rpm while the terminal frequency shows the machine turning (up to ${num(track.maxRpm)} rpm by frequency): the sensor is dead or disconnected.`
      : `The terminal frequency and the speed sensor disagree: frequency over the sensor's equivalent (poles × rpm / 120) is ${num(speedRatio as number, 3)} (median), ` +
        `beyond the ±${num(tolerance * 100, 1)} % tolerance; when the sensor reads ${num(nameplate.ratedRpm)} rpm the frequency says ${num((speedRatio as number) * nameplate.ratedRpm)} rpm.`;
    findings.push(
      finding(
        'speed-sensor-fault',
        verdict === 'insufficient-data' ? 'warning' : 'alarm',
        `${observed} A permanent-magnet generator has no slip, so the frequency gives the true speed.` +
          (readsLow ? ' The sensor reads low: if the controller uses it for its overspeed trip, that trip may come late or not at all.' : ''),
        {
          next:
            (readsLow ? 'Treat the overspeed protection as unproven until the sensor is mended. ' : '') +
            `Check the nameplate pole count (${nameplate.poles}) and the sensor's pulses-per-revolution setting first, from the controller; ` +
            'then, with the unit stopped, the sensor, its target and its wiring.',
          onSite: true,
        },
      ),
    );
  } else if (speedRatio === undefined) {
    findings.push(finding('no-frequency', 'info', 'No frequency readings at speed: the speed sensor could not be cross-checked against the terminal frequency.'));
  }

  if (fit.ke !== undefined && !insufficient) {
    const ke = fit.ke;
    const band = `${num(ke.slope, 3)} (95 % interval ${num(ke.low, 3)} to ${num(ke.high, 3)})`;
    const measured = `${num(ke.slope * nameplate.keVPerKrpm, 1)} V per 1000 rpm against ${num(nameplate.keVPerKrpm, 1)} on the nameplate at ${num(nameplate.keRefC)} °C`;
    if (sensorFault) {
      findings.push(
        finding(
          'magnets-with-frequency-speed',
          ke.slope < limits.keAlarmRatio ? 'alarm' : ke.slope < limits.keWarnRatio ? 'warning' : 'info',
          `With speed taken from the terminal frequency, Ke is ${band} of nameplate (${measured}): magnets ` +
            (ke.slope < limits.keAlarmRatio
              ? `weakened beyond the ${num(limits.keAlarmRatio, 2)} alarm line.`
              : ke.slope < limits.keWarnRatio
                ? `below the ${num(limits.keWarnRatio, 2)} warning line.`
                : 'look healthy.'),
        ),
      );
    }
    if (ke.slope < limits.keAlarmRatio) {
      if (!sensorFault) {
        findings.push(
          finding(
            'demagnetised',
            'alarm',
            `Ke corrected for load and magnet temperature is ${band} of nameplate (${measured}), below the ${num(limits.keAlarmRatio, 2)} alarm line, ` +
              `${pctFromOne(ke.slope)} on all phases alike: the magnets are likely weakened.`,
            {
              next:
                'Check the temperature reading first (a sensor reading cold makes warm magnets look weak), then the history of overheating, overload and short circuits. ' +
                "To confirm, an open-circuit voltage test at a known speed may be made only by the manufacturer's test procedure, by qualified people, " +
                'with the speed held by a controlled drive or brake, the overspeed protection in service and instruments rated for the voltage. ' +
                'Never disconnect the load of a machine that is free to run: a wind rotor or water runner without load can overspeed and run away.',
              onSite: true,
            },
          ),
        );
      }
    } else if (ke.slope < limits.keWarnRatio) {
      findings.push(
        finding(
          'ke-low',
          'warning',
          `Ke corrected for load and magnet temperature is ${band} of nameplate (${measured}), below the ${num(limits.keWarnRatio, 2)} warning line ` +
            `(alarm at ${num(limits.keAlarmRatio, 2)}).`,
          { next: 'Watch the trend over the coming weeks; check the temperature reading and any recent overheating.' },
        ),
      );
    } else if (ke.slope > 2 - limits.keAlarmRatio) {
      findings.push(
        finding(
          'ke-above-nameplate',
          'warning',
          `Ke is ${band} of nameplate (${measured}), more than ${num((1 - limits.keAlarmRatio) * 100)} % above it. Magnets do not get stronger, so a setting or a measurement is wrong.`,
          {
            next: "Check the nameplate's Ke and its reference temperature first; then the voltage transducer ratio in the cabinet.",
            onSite: true,
          },
        ),
      );
    } else if (!sensorFault) {
      findings.push(finding('ke-normal', 'info', `Ke corrected for load and magnet temperature is ${band} of nameplate (${measured}).`));
    }
  }

  if (unbalancePct === undefined) {
    findings.push(finding('no-unbalance', 'info', 'Not all three line voltages were logged at speed: unbalance and shorted turns could not be judged.'));
  } else if (!insufficient) {
    const weakest = fit.phaseKe === undefined ? undefined : weakestPhase(fit.phaseKe);
    const phaseNote =
      fit.phaseKe === undefined
        ? ''
        : ` Ke ratio by phase: a ${num(fit.phaseKe.a, 3)}, b ${num(fit.phaseKe.b, 3)}, c ${num(fit.phaseKe.c, 3)}` +
          (weakest === undefined ? '.' : `; phase ${weakest} is the weakest.`);
    if (unbalancePct > limits.unbalanceAlarmPct) {
      findings.push(
        finding(
          'shorted-turns',
          verdict === 'shorted-turns' ? 'alarm' : 'warning',
          `Line-voltage unbalance is ${num(unbalancePct, 2)} % (median, NEMA MG 1 definition), above the ${num(limits.unbalanceAlarmPct, 1)} % line; ` +
            `negative-sequence unbalance ${fit.negativeSequencePct === undefined ? 'unknown' : `${num(fit.negativeSequencePct, 2)} %`}.${phaseNote} ` +
            'Shorted turns are suspected: a shorted turn lowers one phase and heats, and can burn while the machine turns.',
          {
            next:
              "Stop the unit first by the manufacturer's remote or automatic means; do not approach it while it runs. " +
              'Every check after that with the machine stopped, isolated and proven dead: rule out an unbalanced load and loose or corroded terminals, then measure the phase resistances. ' +
              'Insulation-resistance testing applies a high test voltage: disconnect the rectifier, inverter and controller first.',
            onSite: true,
          },
        ),
      );
    } else {
      findings.push(
        finding(
          'unbalance-normal',
          'info',
          `Line-voltage unbalance is ${num(unbalancePct, 2)} % (median), within the ${num(limits.unbalanceAlarmPct, 1)} % line.${phaseNote}`,
        ),
      );
    }
  }

  if (!insufficient && fit.magnetTempSource === 'keRefC') {
    findings.push(
      finding(
        'no-temperature',
        'info',
        `No stator or ambient temperature readings: Ke was not corrected for magnet temperature (taken as the nameplate's reference, ${num(nameplate.keRefC)} °C). ` +
          `${MAGNET_WORDS[nameplate.magnet]} magnets change Ke by ${num(Math.abs(fit.coeffPctPerC), 3)} % per °C.`,
      ),
    );
  }
  if (!insufficient && fit.loadCorrectionPct !== undefined && fit.naive !== undefined && fit.ke !== undefined) {
    findings.push(
      finding(
        'corrections',
        'info',
        `${num(fit.loadedSharePct ?? 0)} % of used samples were under load; the EMF behind the terminals was on average ${num(fit.loadCorrectionPct, 1)} % above the terminal voltage. ` +
          `Uncorrected terminal volts per rpm give ${num(fit.naive, 3)} of nameplate, corrected ${num(fit.ke.slope, 3)}.`,
      ),
    );
  }

  const usedTimes = timeRange(track, cols, order);
  return {
    samplesUsed: track.count,
    keRatio: keRatio ?? null,
    keRatioLow: fit.ke?.low ?? null,
    keRatioHigh: fit.ke?.high ?? null,
    unbalancePct: unbalancePct ?? null,
    speedRatio: speedRatio ?? null,
    verdict,
    findings: sortFindings(findings),
    details: {
      samplesTotal: n,
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
      fromTs: usedTimes?.[0] ?? null,
      toTs: usedTimes?.[1] ?? null,
      limits,
    },
  };
}

/** Readable names of the magnet materials. */
const MAGNET_WORDS: Record<MagnetMaterial, string> = { ndfeb: 'NdFeB', smco: 'SmCo', ferrite: 'Ferrite' };

/** A time for prose: "2026-12-02 13:30:23 UTC" (to the second; the site's zone is the screen's business). */
function isoTime(ms: number): string {
  return `${new Date(ms).toISOString().slice(0, 19).replace('T', ' ')} UTC`;
}

/** Samples above the overspeed limit: how many, the highest, the time above. */
interface OverspeedRun {
  readonly samples: number;
  readonly peakRpm: number;
  readonly peakTs: string;
  readonly seconds: number;
  readonly firstTs: string;
  readonly lastTs: string;
}

/**
 * Every sample above `maxRpm` (contract, section 5): speed from `rpm`, or
 * from `hz` when the sensor is judged faulty (the sensor's reading where a
 * sample has no frequency). No speed floor or transient filter applies. Time
 * above the limit counts each such sample for half of each interval to a
 * neighbour that is no more than a gap apart, as the energy integration does.
 */
function overspeedRun(cols: SampleColumns, order: Uint32Array | undefined, nameplate: DiagnosisNameplate, fromHz: boolean): OverspeedRun | undefined {
  const n = cols.length;
  const { rpm, hz } = cols.columns;
  const hzToRpm = rpmFromHz(nameplate.poles, 1);
  let samples = 0;
  let peakRpm = -Infinity;
  let peakMs = 0;
  let firstMs = 0;
  let lastMs = 0;
  let seconds = 0;
  let prevMs = NaN;
  let prevAbove = false;
  for (let k = 0; k < n; k++) {
    const i = order === undefined ? k : (order[k] as number);
    const f = hz[i] as number;
    const speed = fromHz && f === f ? f * hzToRpm : (rpm[i] as number);
    const ms = cols.ts[i] as number;
    const above = speed > nameplate.maxRpm;
    const dtS = (ms - prevMs) / 1000;
    if (dtS > 0 && dtS <= OVERSPEED_GAP_S) seconds += (dtS / 2) * ((above ? 1 : 0) + (prevAbove ? 1 : 0));
    if (above) {
      if (samples === 0) firstMs = ms;
      lastMs = ms;
      samples++;
      if (speed > peakRpm) {
        peakRpm = speed;
        peakMs = ms;
      }
    }
    prevMs = ms;
    prevAbove = above;
  }
  if (samples === 0) return undefined;
  return { samples, peakRpm, peakTs: isoTime(peakMs), seconds, firstTs: isoTime(firstMs), lastTs: isoTime(lastMs) };
}

function weakestPhase(ke: { readonly a: number; readonly b: number; readonly c: number }): 'a' | 'b' | 'c' | undefined {
  const entries = [['a', ke.a], ['b', ke.b], ['c', ke.c]] as const;
  const sorted = [...entries].sort((x, y) => x[1] - y[1]);
  const [low, mid] = sorted as unknown as [readonly ['a' | 'b' | 'c', number], readonly ['a' | 'b' | 'c', number]];
  // Only name a phase that stands out from the other two.
  return mid[1] - low[1] > 0.005 ? low[0] : undefined;
}

function timeRange(track: Track, cols: SampleColumns, order: Uint32Array | undefined): [string, string] | undefined {
  if (track.count === 0) return undefined;
  const first = track.used[0] as number;
  const last = track.used[track.count - 1] as number;
  const at = (k: number) => new Date(cols.ts[order === undefined ? k : (order[k] as number)] as number).toISOString();
  return [at(first), at(last)];
}

interface TrackFit {
  ke?: { slope: number; low: number; high: number };
  naive?: number;
  unbalancePct?: number;
  negativeSequencePct?: number;
  phaseKe?: { a: number; b: number; c: number };
  loadedSharePct?: number;
  loadCorrectionPct?: number;
  magnetMeanC?: number;
  magnetTempSource?: TemperatureSource;
  coeffPctPerC: number;
}

/**
 * The Ke fit and unbalance over a track's used samples. For each sample the
 * expected EMF x = Ke(magnet temperature)·speed/1000 and the recovered EMF
 * y = √3·|V + I·(R + jX)|; keRatio is the slope of y on x through the origin.
 */
function fitTrack(track: Track, cols: SampleColumns, order: Uint32Array | undefined, nameplate: DiagnosisNameplate): TrackFit {
  const coeffPctPerC = remanenceCoeffPctPerC(nameplate.magnet, nameplate.magnetTempCoeffPctPerC);
  const result: TrackFit = { coeffPctPerC };
  const m = track.count;
  if (m === 0) return result;
  const { rpm, hz, vab, vbc, vca, ia, ib, ic, kw, statorC, ambientC } = cols.columns;
  const x = new Float64Array(m);
  const y = new Float64Array(m);
  const unbalance = new Float64Array(m);
  const negSeq = new Float64Array(m);
  let nUnbalance = 0;
  let nNegSeq = 0;
  let sxNaive = 0;
  let sxxNaive = 0;
  let sxPhaseA = 0;
  let sxPhaseB = 0;
  let sxPhaseC = 0;
  let sxxPhase = 0;
  let loaded = 0;
  let correctionSum = 0;
  let magnetSum = 0;
  let fromStator = 0;
  let fromAmbient = 0;
  const keRef = nameplate.keVPerKrpm / 1000;
  const coeff = coeffPctPerC / 100;
  const hzPerRpm = nameplate.poles / 120;
  const henry = nameplate.phaseMh / 1000;
  for (let u = 0; u < m; u++) {
    const k = track.used[u] as number;
    const i = order === undefined ? k : (order[k] as number);
    const speed = track.speed[k] as number;
    const stator = statorC[i] as number;
    const ambient = ambientC[i] as number;
    const magnetC = magnetTempC(stator, ambient, nameplate.keRefC);
    if (stator === stator) fromStator++;
    else if (ambient === ambient) fromAmbient++;
    magnetSum += magnetC;
    const windingC = windingTempC(stator, ambient);
    // Past the coefficient's linear range the factor would reach 0; 5 % keeps the fit finite.
    const tempFactor = Math.max(0.05, 1 + coeff * (magnetC - nameplate.keRefC));
    const xi = keRef * tempFactor * speed;
    const a = vab[i] as number;
    const b = vbc[i] as number;
    const c = vca[i] as number;
    const vll = meanOfPhases(a, b, c);
    const current = meanOfPhases(ia[i] as number, ib[i] as number, ic[i] as number);
    const amps = current === current ? current : 0;
    const f = hz[i] === hz[i] ? (hz[i] as number) : hzPerRpm * speed;
    const ohm = windingOhm(nameplate.phaseOhm, windingC);
    const xOhm = 2 * Math.PI * f * henry;
    const pf = loadPowerFactor(kw[i] as number, vll, amps);
    const emfLl = lineEmfBehindTerminals(vll, amps, ohm, xOhm, pf);
    x[u] = xi;
    y[u] = emfLl;
    // The naive measure: terminal volts over the sensor's rpm, nothing corrected.
    const sensorRpm = rpm[i] as number;
    if (sensorRpm === sensorRpm) {
      const naiveX = keRef * sensorRpm;
      sxNaive += naiveX * vll;
      sxxNaive += naiveX * naiveX;
    }
    if (amps > 0) {
      loaded++;
      correctionSum += emfLl / vll - 1;
    }
    if (a === a && b === b && c === c) {
      const pct = lineVoltageUnbalancePct(a, b, c);
      if (pct !== undefined) unbalance[nUnbalance++] = pct;
      const u2 = negativeSequenceUnbalancePct(a, b, c);
      if (u2 !== undefined) negSeq[nNegSeq++] = u2;
      const phases = phaseVoltsFromLines(a, b, c);
      if (phases !== undefined) {
        const pa = ia[i] as number;
        const pb = ib[i] as number;
        const pc = ic[i] as number;
        sxPhaseA += xi * SQRT3 * recoverPhaseEmfFast(phases[0], pa === pa ? pa : amps, ohm, xOhm, pf);
        sxPhaseB += xi * SQRT3 * recoverPhaseEmfFast(phases[1], pb === pb ? pb : amps, ohm, xOhm, pf);
        sxPhaseC += xi * SQRT3 * recoverPhaseEmfFast(phases[2], pc === pc ? pc : amps, ohm, xOhm, pf);
        sxxPhase += xi * xi;
      }
    }
  }
  const ke = fitThroughOrigin(x, y, m);
  if (ke !== undefined) result.ke = { slope: ke.slope, low: ke.low, high: ke.high };
  if (sxxNaive > 0) result.naive = sxNaive / sxxNaive;
  // Median over the used samples that carry all three line voltages.
  if (nUnbalance > 0) result.unbalancePct = median(unbalance, nUnbalance);
  if (nNegSeq > 0) result.negativeSequencePct = median(negSeq, nNegSeq);
  if (sxxPhase > 0) result.phaseKe = { a: sxPhaseA / sxxPhase, b: sxPhaseB / sxxPhase, c: sxPhaseC / sxxPhase };
  result.loadedSharePct = (100 * loaded) / m;
  if (loaded > 0) result.loadCorrectionPct = (100 * correctionSum) / loaded;
  result.magnetMeanC = magnetSum / m;
  result.magnetTempSource = fromStator === m ? 'statorC' : fromAmbient === m ? 'ambientC' : fromStator + fromAmbient === 0 ? 'keRefC' : 'mixed';
  return result;
}
