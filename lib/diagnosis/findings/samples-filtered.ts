/** The finding that says which samples the diagnosis left out, and why. */
import type { Judgement } from '@/lib/diagnosis/judge';
import { finding, num, type Finding } from './finding';

/**
 * samples-filtered (info): how many samples were used, and how many were not
 * for being below the speed floor, in a speed transient or without the speed reading.
 * @example samplesFilteredFinding(judgement)?.message // '700 of 720 samples used; not used: 20 below 45 rpm.'
 */
export function samplesFilteredFinding(j: Judgement): Finding | undefined {
  const { track, limits, nameplate } = j;
  if (track.belowSpeed + track.inTransient + track.withoutVoltage + track.missing === 0) return undefined;
  const parts = [
    track.belowSpeed > 0 ? `${num(track.belowSpeed)} below ${num(limits.minSpeedFraction * nameplate.ratedRpm)} rpm` : '',
    track.inTransient > 0
      ? `${num(track.inTransient)} while the speed changed quickly (faster than ${num(limits.maxSpeedRateFractionPerS * nameplate.ratedRpm, 1)} rpm a second)`
      : '',
    track.missing > 0 ? `${num(track.missing)} without a ${track.source === 'hz' ? 'frequency' : 'speed'} reading` : '',
  ].filter(Boolean);
  if (parts.length === 0) return undefined;
  return finding('samples-filtered', 'info', `${num(track.count)} of ${num(j.samplesTotal)} samples used; not used: ${parts.join(', ')}.`);
}
