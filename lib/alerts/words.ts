/**
 * The words an alert is shown with: each condition in plain words, the unit
 * of its reading, its severity and its state. The screens, the API's readers
 * and notifications share them. Labels reuse the diagnosis's vocabulary where
 * a condition is one of its verdicts, so a crew reads the same name twice.
 */
import type { AlertCondition, AlertEventType, AlertState } from '@/lib/contract/alerts';
import { SEVERITY_LABEL, VERDICT_LABEL } from '@/lib/diagnosis/vocabulary';
import { formatNumber } from '@/lib/text/format';
import type { AlertSeverity } from './conditions';

/** Each condition as a person names it. */
export const CONDITION_NAME: Record<AlertCondition, string> = {
  demagnetisation: VERDICT_LABEL.demagnetised,
  'shorted-turns': VERDICT_LABEL['shorted-turns'],
  'speed-sensor': VERDICT_LABEL['speed-sensor-fault'],
  'ke-trend': 'Magnets weakening towards the alarm line',
  overspeed: 'Overspeed',
  'stator-temperature': 'Stator too hot',
  offline: 'Unit offline',
  'bad-telemetry': 'Telemetry being set aside',
  'nameplate-suspect': 'Nameplate may be wrong',
};

/** How a condition's reading and limit are written: digits and unit. */
const READING_FORMAT: Record<AlertCondition, { digits: number; unit?: string }> = {
  demagnetisation: { digits: 3, unit: '× nameplate Ke' },
  'shorted-turns': { digits: 2, unit: '% unbalance' },
  'speed-sensor': { digits: 3, unit: '(speed ratio)' },
  'ke-trend': { digits: 0, unit: 'days' },
  overspeed: { digits: 0, unit: 'rpm' },
  'stator-temperature': { digits: 0, unit: '°C' },
  offline: { digits: 0, unit: 'min' },
  'bad-telemetry': { digits: 0, unit: 'set aside' },
  'nameplate-suspect': { digits: 3, unit: '× nameplate Ke' },
};

/**
 * A condition's reading or limit with its unit; '–' when there is none.
 * @example formatAlertReading('overspeed', 431.6) // '432\u202frpm'
 */
export function formatAlertReading(condition: AlertCondition, value: number | null): string {
  const f = READING_FORMAT[condition];
  return formatNumber(value, f.digits, f.unit);
}

/** Severity as a person reads it. */
export function severityName(severity: AlertSeverity): string {
  return SEVERITY_LABEL[severity];
}

/** The states in words. */
export const STATE_NAME: Record<AlertState, string> = {
  active: 'Active',
  acknowledged: 'Acknowledged',
  cleared: 'Cleared',
  shelved: 'Shelved',
};

/**
 * The state of one alert as a short phrase: a cleared alert nobody took says so, as it stays in
 * the crews' list.
 */
export function stateText(state: AlertState, acknowledged: boolean): string {
  if (state === 'cleared') return acknowledged ? 'Cleared' : 'Cleared, not acknowledged';
  if (state === 'shelved') return acknowledged ? 'Shelved (acknowledged)' : 'Shelved';
  return STATE_NAME[state];
}

/** What happened, as the history lists it. */
export const EVENT_NAME: Record<AlertEventType, string> = {
  opened: 'Opened',
  acknowledged: 'Acknowledged',
  cleared: 'Cleared',
  reopened: 'Came back before clearing',
  shelved: 'Shelved',
  unshelved: 'Back from the shelf',
  escalated: 'Sent again to more people',
};
