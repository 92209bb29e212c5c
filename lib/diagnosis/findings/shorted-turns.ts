/** The findings of the line-voltage unbalance: shorted turns suspected, a normal unbalance, or none to judge. */
import type { Judgement } from '@/lib/diagnosis/judge';
import { unbalanceIsAlarm } from '@/lib/diagnosis/limits';
import { finding, num, type Finding } from './finding';

/** The Ke ratio of each phase, naming the weakest; empty without all three lines. */
function phaseNote(j: Judgement): string {
  const ke = j.fit.phaseKe;
  if (ke === undefined) return '';
  return (
    ` Ke ratio by phase: a ${num(ke.a, 3)}, b ${num(ke.b, 3)}, c ${num(ke.c, 3)}` +
    (j.weakestPhase === undefined ? '.' : `; phase ${j.weakestPhase} is the weakest.`)
  );
}

/**
 * shorted-turns (alarm with that verdict, else warning; on site): median
 * line-voltage unbalance above the alarm line.
 * @example shortedTurnsFinding(judge({ nameplate, samples: onePhaseLow })).severity // 'alarm'
 */
export function shortedTurnsFinding(j: Judgement): Finding | undefined {
  const pct = j.fit.unbalancePct;
  if (pct === undefined || j.insufficient || !unbalanceIsAlarm(pct, j.limits)) return undefined;
  const negativeSequencePct = j.fit.negativeSequencePct;
  return finding(
    'shorted-turns',
    j.verdict === 'shorted-turns' ? 'alarm' : 'warning',
    `Line-voltage unbalance is ${num(pct, 2)} % (median, NEMA MG 1 definition), above the ${num(j.limits.unbalanceAlarmPct, 1)} % line; ` +
      `negative-sequence unbalance ${negativeSequencePct === undefined ? 'unknown' : `${num(negativeSequencePct, 2)} %`}.${phaseNote(j)} ` +
      'Shorted turns are suspected: a shorted turn lowers one phase and heats, and can burn while the machine turns.',
    {
      next:
        "Stop the unit first by the manufacturer's remote or automatic means; do not approach it while it runs. " +
        'Every check after that with the machine stopped, isolated and proven dead: rule out an unbalanced load and loose or corroded terminals, then measure the phase resistances. ' +
        'Insulation-resistance testing applies a high test voltage: disconnect the rectifier, inverter and controller first.',
      onSite: true,
    },
  );
}

/**
 * unbalance-normal (info): median line-voltage unbalance within the alarm line.
 * @example unbalanceNormalFinding(judge({ nameplate, samples })).code // 'unbalance-normal'
 */
export function unbalanceNormalFinding(j: Judgement): Finding | undefined {
  const pct = j.fit.unbalancePct;
  if (pct === undefined || j.insufficient || unbalanceIsAlarm(pct, j.limits)) return undefined;
  return finding(
    'unbalance-normal',
    'info',
    `Line-voltage unbalance is ${num(pct, 2)} % (median), within the ${num(j.limits.unbalanceAlarmPct, 1)} % line.${phaseNote(j)}`,
  );
}

/**
 * no-unbalance (info): not all three line voltages at speed, so shorted turns went unjudged.
 * @example noUnbalanceFinding(judge({ nameplate, samples: vabOnly })).code // 'no-unbalance'
 */
export function noUnbalanceFinding(j: Judgement): Finding | undefined {
  if (j.fit.unbalancePct !== undefined) return undefined;
  return finding('no-unbalance', 'info', 'Not all three line voltages were logged at speed: unbalance and shorted turns could not be judged.');
}
