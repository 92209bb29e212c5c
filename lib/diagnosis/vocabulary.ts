/**
 * One vocabulary for verdicts and unit states, shared by the command line and
 * the screens. The words are the cautious ones: a diagnosis from telemetry
 * suspects a fault, a crew's measurement confirms it.
 */
import type { Verdict } from './diagnose';

/** Short label of a verdict, as a badge or a report heading shows it. */
export const VERDICT_LABEL: Record<Verdict, string> = {
  healthy: 'Healthy',
  demagnetised: 'Magnets weakened',
  'shorted-turns': 'Shorted turns suspected',
  'speed-sensor-fault': 'Speed sensor suspect',
  'insufficient-data': 'Not enough running data',
};

/** One line saying what the verdict rests on. */
export const VERDICT_BASIS: Record<Verdict, string> = {
  healthy: 'Ke, unbalance and speed reading within their limits',
  demagnetised: 'corrected Ke low on all phases alike',
  'shorted-turns': 'line voltages unbalanced, one phase low',
  'speed-sensor-fault': 'terminal frequency and speed sensor disagree',
  'insufficient-data': 'no verdict on the machine yet',
};

/** Label of a unit that has never been diagnosed. */
export const NOT_JUDGED_LABEL = 'Not yet judged';

/** Label of a unit with no recent sample; `since` is a phrase such as "3 h". */
export function noDataLabel(since: string | undefined): string {
  return since === undefined ? 'No data received' : `No data for ${since}`;
}

/**
 * The label of a verdict code, or the code itself when it is not one we know
 * (a newer writer); never throws.
 * @example verdictLabel('shorted-turns') // 'Shorted turns suspected'
 */
export function verdictLabel(verdict: string): string {
  return (VERDICT_LABEL as Record<string, string>)[verdict] ?? verdict;
}
