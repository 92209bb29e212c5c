/** The finding of a diagnosis without enough running data to judge the machine. */
import type { Judgement } from '@/lib/diagnosis/judge';
import { finding, num, type Finding } from './finding';

/**
 * insufficient-data (warning): too few usable samples, or enough of them all
 * at about one speed, where a slope of voltage against speed is not defined.
 * @example insufficientDataFinding(judge({ nameplate, samples: samples.slice(0, 20) }))?.code // 'insufficient-data'
 */
export function insufficientDataFinding(j: Judgement): Finding | undefined {
  if (!j.insufficient) return undefined;
  const { track, limits, nameplate } = j;
  const spanNeeded = limits.minSpeedSpanFraction * nameplate.ratedRpm;
  if (track.count >= limits.minSamples) {
    return finding(
      'insufficient-data',
      'warning',
      `The unit ran at one steady speed: the ${num(track.count)} usable samples lie between ${num(track.minRpm)} and ${num(track.maxRpm)} rpm, ` +
        `a range of ${num(j.speedSpanRpm)} rpm, and the diagnosis needs at least ${num(spanNeeded)} rpm (${num(limits.minSpeedSpanFraction * 100)} % of rated). ` +
        'Ke is the slope of voltage against speed, and one speed gives no slope: a unit held at constant speed by a load controller always reads like this, and more hours at that speed will not help.',
      {
        next:
          'Judge it from a log that includes a start-up or a run-down, which sweeps the speed through its range: ' +
          "download one from the unit's controller after a normal start or stop and run `millrace check` on it. " +
          'Do not change speed or open the load on purpose to make one.',
      },
    );
  }
  const speedWord = track.source === 'hz' ? 'speed from the terminal frequency' : 'speed';
  return finding(
    'insufficient-data',
    'warning',
    `Only ${num(track.count)} samples were usable; the diagnosis needs at least ${num(limits.minSamples)} with the ${speedWord} ` +
      `above ${num(limits.minSpeedFraction * nameplate.ratedRpm)} rpm (${num(limits.minSpeedFraction * 100)} % of rated), spread over at least ${num(spanNeeded)} rpm.`,
    { next: 'Wait for the unit to run above that speed for a while, or check a longer log that covers more of its running.' },
  );
}
