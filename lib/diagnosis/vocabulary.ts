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

/** Short heading of each finding code, for reports and screens. */
export const FINDING_TITLE: Record<string, string> = {
  'rows-skipped': 'Rows of the log skipped',
  'unknown-columns': 'Columns ignored',
  'insufficient-data': 'Not enough running data',
  'samples-filtered': 'Samples left out',
  'no-voltage-at-speed': 'No voltage while turning',
  overspeed: 'Overspeed',
  'no-frequency': 'Speed not cross-checked',
  'speed-sensor-fault': 'Speed sensor suspect',
  'magnets-with-frequency-speed': 'Magnets, with speed from frequency',
  demagnetised: 'Magnets weakened',
  'ke-low': 'Ke below the warning line',
  'ke-above-nameplate': 'Ke above nameplate',
  'ke-normal': 'Ke within limits',
  'no-unbalance': 'Unbalance not judged',
  'shorted-turns': 'Shorted turns suspected',
  'unbalance-normal': 'Line voltages balanced',
  'no-temperature': 'No temperature correction',
  corrections: 'Corrections applied',
  'limits-invalid': 'Stored limits invalid',
  'window-capped': 'Window shortened',
};

/**
 * The heading of a finding, or its code when it has none.
 * @example findingTitle('overspeed') // 'Overspeed'
 */
export function findingTitle(code: string): string {
  return FINDING_TITLE[code] ?? code;
}

/** Severity words for people: what the severity asks of them. */
export const SEVERITY_LABEL = { alarm: 'Alarm', warning: 'Warning', info: 'Note' } as const;
