/**
 * The words of a diagnosis: one builder per finding, each taking the judged
 * facts ({@link Judgement}) and returning its finding, or undefined when it
 * does not apply. The check report, the live diagnosis, alerts and the visit
 * sheet share them; {@link findingsOf} gives a diagnosis's findings in the
 * order they are reported (before sorting by severity).
 */
import type { Judgement } from '@/lib/diagnosis/judge';
import { correctionsFinding } from './corrections';
import {
  demagnetisedFinding,
  keAboveNameplateFinding,
  keLowFinding,
  keNormalFinding,
  magnetsWithFrequencySpeedFinding,
} from './demagnetisation';
import { insufficientDataFinding } from './insufficient';
import { noVoltageAtSpeedFinding } from './no-voltage';
import { overspeedFinding } from './overspeed';
import { samplesFilteredFinding } from './samples-filtered';
import { noUnbalanceFinding, shortedTurnsFinding, unbalanceNormalFinding } from './shorted-turns';
import { noFrequencyFinding, speedSensorFaultFinding } from './speed-sensor';
import { noTemperatureFinding } from './temperature';
import type { Finding } from './finding';

export * from './finding';
export { correctionsFinding } from './corrections';
export { demagnetisedFinding, keAboveNameplateFinding, keLowFinding, keNormalFinding, magnetsWithFrequencySpeedFinding } from './demagnetisation';
export { insufficientDataFinding } from './insufficient';
export { noVoltageAtSpeedFinding } from './no-voltage';
export { overspeedFinding } from './overspeed';
export { samplesFilteredFinding } from './samples-filtered';
export { noUnbalanceFinding, shortedTurnsFinding, unbalanceNormalFinding } from './shorted-turns';
export { noFrequencyFinding, speedSensorFaultFinding } from './speed-sensor';
export { noTemperatureFinding } from './temperature';

/** A finding's words from the judged facts; undefined when the finding does not apply. */
export type FindingBuilder = (judgement: Judgement) => Finding | undefined;

/** The builders in the order a diagnosis reports its findings. */
export const FINDING_BUILDERS: readonly FindingBuilder[] = [
  insufficientDataFinding,
  samplesFilteredFinding,
  noVoltageAtSpeedFinding,
  overspeedFinding,
  speedSensorFaultFinding,
  noFrequencyFinding,
  magnetsWithFrequencySpeedFinding,
  demagnetisedFinding,
  keLowFinding,
  keAboveNameplateFinding,
  keNormalFinding,
  noUnbalanceFinding,
  shortedTurnsFinding,
  unbalanceNormalFinding,
  noTemperatureFinding,
  correctionsFinding,
];

/**
 * Every finding that applies to a judgement, in report order (unsorted).
 * @example findingsOf(judge({ nameplate, samples })).map((f) => f.code) // ['ke-normal', 'unbalance-normal']
 */
export function findingsOf(judgement: Judgement): Finding[] {
  const findings: Finding[] = [];
  for (const build of FINDING_BUILDERS) {
    const f = build(judgement);
    if (f !== undefined) findings.push(f);
  }
  return findings;
}
