/** The findings of the speed-sensor cross-check against the terminal frequency. */
import type { Judgement } from '@/lib/diagnosis/judge';
import { finding, num, type Finding } from './finding';

/**
 * speed-sensor-fault (alarm, or warning without a verdict; on site): the
 * sensor and the terminal frequency disagree, or the sensor reads 0 while the
 * frequency shows the machine turning.
 * @example speedSensorFaultFinding(judgement)?.code // 'speed-sensor-fault'
 */
export function speedSensorFaultFinding(j: Judgement): Finding | undefined {
  if (!j.sensorFault) return undefined;
  const { speedRatio, nameplate } = j;
  // speedRatio is undefined here only when the sensor reads zero while the frequency shows the machine turning.
  const readsLow = speedRatio === undefined || speedRatio > 1;
  const observed =
    speedRatio === undefined
      ? `The speed sensor reads 0 rpm while the terminal frequency shows the machine turning (up to ${num(j.track.maxRpm)} rpm by frequency): the sensor is dead or disconnected.`
      : `The terminal frequency and the speed sensor disagree: frequency over the sensor's equivalent (poles × rpm / 120) is ${num(speedRatio, 3)} (median), ` +
        `beyond the ±${num(j.limits.speedRatioTolerance * 100, 1)} % tolerance; when the sensor reads ${num(nameplate.ratedRpm)} rpm the frequency says ${num(speedRatio * nameplate.ratedRpm)} rpm.`;
  return finding(
    'speed-sensor-fault',
    j.verdict === 'insufficient-data' ? 'warning' : 'alarm',
    `${observed} A permanent-magnet generator has no slip, so the frequency gives the true speed.` +
      (readsLow ? ' The sensor reads low: if the controller uses it for its overspeed trip, that trip may come late or not at all.' : ''),
    {
      next:
        (readsLow ? 'Treat the overspeed protection as unproven until the sensor is mended. ' : '') +
        `Check the nameplate pole count (${nameplate.poles}) and the sensor's pulses-per-revolution setting first, from the controller; ` +
        'then, with the unit stopped, the sensor, its target and its wiring.',
      onSite: true,
    },
  );
}

/**
 * no-frequency (info): no frequency at speed, so the sensor went unchecked.
 * @example noFrequencyFinding(judge({ nameplate, samples: withoutHz })).code // 'no-frequency'
 */
export function noFrequencyFinding(j: Judgement): Finding | undefined {
  if (j.sensorFault || j.speedRatio !== undefined) return undefined;
  return finding('no-frequency', 'info', 'No frequency readings at speed: the speed sensor could not be cross-checked against the terminal frequency.');
}
