/**
 * Findings of a diagnosis: what was seen, the number, the threshold and what
 * to check next. A finding that sends someone to the machine ends with the
 * safety caution.
 */

export const SEVERITIES = ['info', 'warning', 'alarm'] as const;
export type Severity = (typeof SEVERITIES)[number];

/** One finding, as the contract's check JSON carries it (section 4). */
export interface Finding {
  readonly code: string;
  readonly severity: Severity;
  readonly message: string;
}

/** The caution every finding carries that sends someone to the machine. */
export const SAFETY_CAUTION =
  'Caution: a permanent-magnet generator makes voltage whenever its shaft turns, even disconnected; ' +
  "stop, isolate and lock the rotor following the manufacturer's procedure, local electrical codes and licensed practice before working on it.";

/**
 * A finding; `onSite` appends the safety caution.
 * @example finding('ke-low', 'warning', 'Ke is 3.5 % below nameplate.', true).message.endsWith(SAFETY_CAUTION) // true
 */
export function finding(code: string, severity: Severity, message: string, onSite = false): Finding {
  return { code, severity, message: onSite ? `${message} ${SAFETY_CAUTION}` : message };
}

const RANK: Record<Severity, number> = { alarm: 0, warning: 1, info: 2 };

/**
 * Findings ordered alarm, warning, info, keeping their order within a severity.
 * @example sortFindings([finding('a', 'info', 'x'), finding('b', 'alarm', 'y')])[0].code // 'b'
 */
export function sortFindings(findings: readonly Finding[]): Finding[] {
  return findings
    .map((f, i) => ({ f, i }))
    .sort((x, y) => RANK[x.f.severity] - RANK[y.f.severity] || x.i - y.i)
    .map((x) => x.f);
}

/** Formats a number for a message with `digits` decimals, thousands separated. */
export function num(value: number, digits = 0): string {
  return value.toLocaleString('en-US', { minimumFractionDigits: digits, maximumFractionDigits: digits });
}

/** Formats a ratio as a signed percentage difference from 1, e.g. 0.962 -> "−3.8 %". */
export function pctFromOne(ratio: number, digits = 1): string {
  const pct = (ratio - 1) * 100;
  const text = num(Math.abs(pct), digits);
  return `${pct < 0 ? '−' : '+'}${text} %`;
}
