/**
 * The findings of the Ke ratio: weakened magnets, a Ke low enough to watch,
 * one above nameplate (a setting or measurement is wrong), a normal one, and
 * the magnets judged with speed from the frequency when the sensor is suspect.
 * Each applies only when the fit gave a Ke and there is a verdict.
 */
import type { Judgement } from '@/lib/diagnosis/judge';
import { finding, num, pctFromOne, type Finding } from './finding';

/** The Ke ratio with its interval, and what it means in V per 1000 rpm against the nameplate. */
function keWords(j: Judgement, ke: { readonly slope: number; readonly low: number; readonly high: number }): { band: string; measured: string } {
  const { keVPerKrpm, keRefC } = j.nameplate;
  return {
    band: `${num(ke.slope, 3)} (95 % interval ${num(ke.low, 3)} to ${num(ke.high, 3)})`,
    measured: `${num(ke.slope * keVPerKrpm, 1)} V per 1000 rpm against ${num(keVPerKrpm, 1)} on the nameplate at ${num(keRefC)} °C`,
  };
}

/** The fitted Ke of a judgement with a verdict; undefined without either. */
function judgedKe(j: Judgement): { readonly slope: number; readonly low: number; readonly high: number } | undefined {
  return j.insufficient ? undefined : j.fit.ke;
}

/**
 * magnets-with-frequency-speed (alarm, warning or info): with the sensor
 * suspect, the magnets judged on speed from the terminal frequency.
 * @example magnetsWithFrequencySpeedFinding(judgement)?.severity // 'info'
 */
export function magnetsWithFrequencySpeedFinding(j: Judgement): Finding | undefined {
  const ke = judgedKe(j);
  if (ke === undefined || !j.sensorFault) return undefined;
  const { limits } = j;
  const { band, measured } = keWords(j, ke);
  return finding(
    'magnets-with-frequency-speed',
    ke.slope < limits.keAlarmRatio ? 'alarm' : ke.slope < limits.keWarnRatio ? 'warning' : 'info',
    `With speed taken from the terminal frequency, Ke is ${band} of nameplate (${measured}): magnets ` +
      (ke.slope < limits.keAlarmRatio
        ? `weakened beyond the ${num(limits.keAlarmRatio, 2)} alarm line.`
        : ke.slope < limits.keWarnRatio
          ? `below the ${num(limits.keWarnRatio, 2)} warning line.`
          : 'look healthy.'),
  );
}

/**
 * demagnetised (alarm, on site): corrected Ke below the alarm line on all
 * phases alike, with the speed sensor trusted.
 * @example demagnetisedFinding(judge({ nameplate, samples: weakened })).code // 'demagnetised'
 */
export function demagnetisedFinding(j: Judgement): Finding | undefined {
  const ke = judgedKe(j);
  if (ke === undefined || j.sensorFault || !(ke.slope < j.limits.keAlarmRatio)) return undefined;
  const { band, measured } = keWords(j, ke);
  return finding(
    'demagnetised',
    'alarm',
    `Ke corrected for load and magnet temperature is ${band} of nameplate (${measured}), below the ${num(j.limits.keAlarmRatio, 2)} alarm line, ` +
      `${pctFromOne(ke.slope)} on all phases alike: the magnets are likely weakened.`,
    {
      next:
        'Check the temperature reading first (a sensor reading cold makes warm magnets look weak), then the history of overheating, overload and short circuits. ' +
        "To confirm, an open-circuit voltage test at a known speed may be made only by the manufacturer's test procedure, by qualified people, " +
        'with the speed held by a controlled drive or brake, the overspeed protection in service and instruments rated for the voltage. ' +
        'Never disconnect the load of a machine that is free to run: a wind rotor or water runner without load can overspeed and run away.',
      onSite: true,
    },
  );
}

/**
 * ke-low (warning): corrected Ke between the alarm and the warning line.
 * @example keLowFinding(judgement)?.severity // 'warning'
 */
export function keLowFinding(j: Judgement): Finding | undefined {
  const ke = judgedKe(j);
  const { keAlarmRatio, keWarnRatio } = j.limits;
  if (ke === undefined || ke.slope < keAlarmRatio || !(ke.slope < keWarnRatio)) return undefined;
  const { band, measured } = keWords(j, ke);
  return finding(
    'ke-low',
    'warning',
    `Ke corrected for load and magnet temperature is ${band} of nameplate (${measured}), below the ${num(keWarnRatio, 2)} warning line ` +
      `(alarm at ${num(keAlarmRatio, 2)}).`,
    { next: 'Watch the trend over the coming weeks; check the temperature reading and any recent overheating.' },
  );
}

/** Ke at or above the warning line: the band where it is either normal or implausibly high. */
function keAtLeastWarnLine(j: Judgement, ke: { readonly slope: number }): boolean {
  return !(ke.slope < j.limits.keAlarmRatio) && !(ke.slope < j.limits.keWarnRatio);
}

/**
 * ke-above-nameplate (warning, on site): Ke as far above nameplate as the
 * alarm line is below it; magnets do not get stronger.
 * @example keAboveNameplateFinding(judgement)?.code // 'ke-above-nameplate'
 */
export function keAboveNameplateFinding(j: Judgement): Finding | undefined {
  const ke = judgedKe(j);
  if (ke === undefined || !keAtLeastWarnLine(j, ke) || !(ke.slope > 2 - j.limits.keAlarmRatio)) return undefined;
  const { band, measured } = keWords(j, ke);
  return finding(
    'ke-above-nameplate',
    'warning',
    `Ke is ${band} of nameplate (${measured}), more than ${num((1 - j.limits.keAlarmRatio) * 100)} % above it. Magnets do not get stronger, so a setting or a measurement is wrong.`,
    {
      next: "Check the nameplate's Ke and its reference temperature first; then the voltage transducer ratio in the cabinet.",
      onSite: true,
    },
  );
}

/**
 * ke-normal (info): corrected Ke within its lines, with the speed sensor trusted.
 * @example keNormalFinding(judge({ nameplate, samples })).code // 'ke-normal'
 */
export function keNormalFinding(j: Judgement): Finding | undefined {
  const ke = judgedKe(j);
  if (ke === undefined || j.sensorFault || !keAtLeastWarnLine(j, ke) || ke.slope > 2 - j.limits.keAlarmRatio) return undefined;
  const { band, measured } = keWords(j, ke);
  return finding('ke-normal', 'info', `Ke corrected for load and magnet temperature is ${band} of nameplate (${measured}).`);
}
