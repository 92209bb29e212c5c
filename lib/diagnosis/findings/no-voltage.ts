/** The finding of samples that read no voltage while the machine turned. */
import type { Judgement } from '@/lib/diagnosis/judge';
import { finding, num, type Finding } from './finding';

/**
 * no-voltage-at-speed (warning, on site): samples at speed reading 0 V on
 * every line, which a turning permanent-magnet generator cannot give.
 * @example noVoltageAtSpeedFinding(judgement)?.severity // 'warning'
 */
export function noVoltageAtSpeedFinding(j: Judgement): Finding | undefined {
  if (!(j.track.withoutVoltage > 0)) return undefined;
  return finding(
    'no-voltage-at-speed',
    'warning',
    `${num(j.track.withoutVoltage)} samples read 0 V on every line while turning above ${num(j.limits.minSpeedFraction * j.nameplate.ratedRpm)} rpm; they were not used. ` +
      'A turning permanent-magnet generator always makes voltage, so the measurement is wrong, not the machine.',
    {
      next: 'Check the voltage transducers, their fuses and wiring in the cabinet; the terminals are live whenever the shaft turns.',
      onSite: true,
    },
  );
}
