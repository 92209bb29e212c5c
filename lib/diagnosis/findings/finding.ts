/**
 * A finding of a diagnosis: what was seen, the number, the threshold and what
 * to do next. A finding that sends someone to the machine ends with the
 * safety caution.
 *
 * The message of a finding is plain text in three parts, in this order: what
 * was seen; "Next steps: ..." when there is something to do; the safety
 * caution when the next steps take someone to the machine or into its
 * cabinet. {@link splitFindingMessage} takes them apart again for screens and
 * the readable report, so the contract's JSON keeps its one `message` field.
 */

export const SEVERITIES = ['info', 'warning', 'alarm'] as const;
export type Severity = (typeof SEVERITIES)[number];

/** One finding, as the contract's check JSON carries it (section 4). */
export interface Finding {
  readonly code: string;
  readonly severity: Severity;
  readonly message: string;
}

/**
 * The caution every finding carries that sends someone to the machine. Our
 * own words for the usual cautions of work on permanent-magnet generators
 * (common practice, no single published source); the manufacturer's
 * procedure, local electrical codes and licensed practice come first.
 */
export const SAFETY_CAUTION =
  'Caution: a permanent-magnet generator makes voltage whenever its shaft turns, even with its load or breaker open. ' +
  'Stop the unit by its remote or automatic means first. ' +
  'Hydro: close the intake and let the runner stop; water can start it again. ' +
  'Wind: furl or brake the rotor and tie it; do not climb in high wind; use fall protection. ' +
  'Isolate, lock out and prove dead before touching anything; battery banks, inverter back-feed and capacitors are sources too. ' +
  "Follow the manufacturer's procedure, local electrical codes and licensed practice.";

/** The words that start the next steps inside a finding's message. */
export const NEXT_STEPS_PREFIX = 'Next steps:';

/** What a finding asks for beyond the observation. */
export interface FindingAdvice {
  /** What to do next, in plain words (without the "Next steps:" prefix). */
  readonly next?: string;
  /** The next steps take someone to the machine or into its cabinet: the caution is appended. */
  readonly onSite?: boolean;
}

/**
 * A finding from an observation and, optionally, next steps and the caution.
 * @example finding('ke-low', 'warning', 'Ke is 3.5 % below nameplate.', { next: 'Watch the trend.', onSite: true }).message.endsWith(SAFETY_CAUTION) // true
 */
export function finding(code: string, severity: Severity, observation: string, advice: FindingAdvice = {}): Finding {
  const parts = [observation];
  if (advice.next !== undefined) parts.push(`${NEXT_STEPS_PREFIX} ${advice.next}`);
  if (advice.onSite === true) parts.push(SAFETY_CAUTION);
  return { code, severity, message: parts.join(' ') };
}

/** A finding's message taken apart: what was seen, what to do, and whether the caution applies. */
export interface FindingParts {
  readonly observation: string;
  readonly nextSteps: string | undefined;
  readonly caution: boolean;
}

/**
 * Splits a message made by {@link finding} into its parts; a message from
 * elsewhere is all observation.
 * @example splitFindingMessage(finding('x', 'info', 'Seen.', { next: 'Do.' }).message) // { observation: 'Seen.', nextSteps: 'Do.', caution: false }
 */
export function splitFindingMessage(message: string): FindingParts {
  let rest = message;
  const caution = rest.endsWith(SAFETY_CAUTION);
  if (caution) rest = rest.slice(0, -SAFETY_CAUTION.length).trimEnd();
  const at = rest.indexOf(` ${NEXT_STEPS_PREFIX} `);
  if (at < 0) return { observation: rest, nextSteps: undefined, caution };
  return { observation: rest.slice(0, at), nextSteps: rest.slice(at + NEXT_STEPS_PREFIX.length + 2), caution };
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

/**
 * A duration in words: "40 s", "12 min", "3.5 h", "2.1 days".
 * @example durationWords(5400) // '1.5 h'
 */
export function durationWords(seconds: number): string {
  if (seconds < 90) return `${num(seconds)} s`;
  if (seconds < 90 * 60) return `${num(seconds / 60)} min`;
  if (seconds < 48 * 3600) return `${num(seconds / 3600, 1)} h`;
  return `${num(seconds / 86400, 1)} days`;
}
