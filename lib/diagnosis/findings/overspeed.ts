/** The finding of a unit that ran above its overspeed limit. */
import type { Judgement } from '@/lib/diagnosis/judge';
import { durationWords, finding, num, pctFromOne, type Finding } from './finding';

/**
 * overspeed (alarm, on site): how many samples were above `maxRpm`, the
 * highest speed and when, and the time above the limit in all.
 * @example overspeedFinding(judgement)?.severity // 'alarm'
 */
export function overspeedFinding(j: Judgement): Finding | undefined {
  const run = j.overspeed;
  if (run === undefined) return undefined;
  const { maxRpm } = j.nameplate;
  return finding(
    'overspeed',
    'alarm',
    `${num(run.samples)} sample${run.samples === 1 ? '' : 's'} above the ${num(maxRpm)} rpm overspeed limit` +
      `${j.sensorFault ? ' (speed from the terminal frequency, as the speed sensor is suspect)' : ''}; ` +
      `highest ${num(run.peakRpm)} rpm (${pctFromOne(run.peakRpm / maxRpm)} against the limit) at ${run.peakTs}; ` +
      `about ${durationWords(run.seconds)} above the limit in all, between ${run.firstTs} and ${run.lastTs}.`,
    {
      next:
        'Stop the unit by its remote or automatic means. Do not approach it until the rotor or runner is secured. ' +
        'Before a restart, have the blades or runner, the bearings and the overspeed protection (brake, furling, dump load or governor) inspected by qualified people.',
      onSite: true,
    },
  );
}
