/**
 * The state of a unit as the screens show it: one of five, worst first, from
 * its latest diagnosis and how long ago its last sample arrived. Pure: the
 * queries feed it, the screens and the read API show it.
 */
import { splitFindingMessage } from '@/lib/diagnosis/findings';
import { findingTitle, NOT_JUDGED_LABEL, noDataLabel, VERDICT_BASIS, verdictLabel } from '@/lib/diagnosis/vocabulary';

/** Unit states, worst first: the order of the fleet's counts and of every sort by state. */
export const UNIT_STATES = ['fault', 'warning', 'no-data', 'not-judged', 'healthy'] as const;
export type UnitState = (typeof UNIT_STATES)[number];

/** Short names of the states as counted on the fleet page. */
export const UNIT_STATE_NAME: Record<UnitState, string> = {
  fault: 'Fault',
  warning: 'Warning',
  'no-data': 'No data',
  'not-judged': 'Not yet judged',
  healthy: 'Healthy',
};

/**
 * A unit without a sample for this long counts as "no data", 15 minutes: the
 * demo devices send every 10 s in messages of up to 100 s, so 15 minutes is
 * several missed messages, not one late one (common practice, no published
 * source). The alerts issue will make it per unit.
 */
export const OFFLINE_AFTER_MS = 15 * 60_000;

/** Verdicts that name a fault of the machine or its sensor. */
const FAULT_VERDICTS: ReadonlySet<string> = new Set(['demagnetised', 'shorted-turns', 'speed-sensor-fault']);

/** The part of a unit's latest health the state is judged from. */
export interface HealthSummary {
  readonly verdict: string;
  readonly findings: ReadonlyArray<{ readonly code: string; readonly severity: string; readonly message: string }>;
}

/** A unit's state, with the words that say why. */
export interface UnitStateView {
  readonly state: UnitState;
  /** Badge text, from the one vocabulary (lib/diagnosis/vocabulary.ts). */
  readonly label: string;
  /** One line saying why the unit needs attention; undefined when it does not. */
  readonly reason: string | undefined;
  /** Rank inside the state for sorting, lower first (an offline unit last judged faulty before other offline units). */
  readonly rank: number;
}

/**
 * "40 s", "12 min", "3 h", "5 d": how long since a time, for "No data for …".
 * @example sinceText(3 * 3600_000) // '3 h'
 */
export function sinceText(ms: number): string {
  if (!Number.isFinite(ms)) throw new RangeError(`ms must be a finite number of milliseconds, got ${ms}`);
  const s = Math.max(0, Math.round(ms / 1000));
  if (s < 90) return `${s} s`;
  if (s < 90 * 60) return `${Math.round(s / 60)} min`;
  if (s < 48 * 3600) return `${Math.round(s / 3600)} h`;
  return `${Math.round(s / 86400)} d`;
}

/** The first finding of a severity that is not just "not enough data". */
function firstFinding(health: HealthSummary, severity: string) {
  return health.findings.find((f) => f.severity === severity && f.code !== 'insufficient-data');
}

/** Why a unit has no verdict, in the diagnosis's own words (one steady speed, or too few samples). */
function insufficientReason(health: HealthSummary): string {
  const f = health.findings.find((x) => x.code === 'insufficient-data');
  return f === undefined ? 'Not enough running data for a verdict yet.' : shortReason(f.message);
}

/** The first sentence of a finding's message, for a one-line reason. */
export function firstSentence(message: string): string {
  const m = /^(.+?[.!?])(\s|$)/.exec(message);
  return (m ? m[1] : message) as string;
}

/** Longest reason line before it is cut at a clause boundary. */
const REASON_MAX = 160;

/**
 * The first sentence of a finding, cut at a clause boundary when long (the
 * whole finding is on the unit's page).
 * @example shortReason('Ke is 0.91 of nameplate. Check it.') // 'Ke is 0.91 of nameplate.'
 */
export function shortReason(message: string): string {
  const first = firstSentence(splitFindingMessage(message).observation);
  if (first.length <= REASON_MAX) return first;
  const cut = Math.max(first.lastIndexOf(';', REASON_MAX), first.lastIndexOf(',', REASON_MAX), first.lastIndexOf(' (', REASON_MAX));
  return `${first.slice(0, cut > 60 ? cut : REASON_MAX).trimEnd()} …`;
}

/** What a fault verdict rests on, when no finding says more. */
const VERDICT_BASIS_TEXT: Record<string, string> = VERDICT_BASIS;

/**
 * The state of a unit from its latest health (undefined: never diagnosed) and
 * its last sample time (null: never sent one) at `nowMs`.
 * @example unitStateOf({ health: { verdict: 'demagnetised', findings: [] }, lastSampleMs: now, nowMs: now }).state // 'fault'
 */
export function unitStateOf({
  health,
  lastSampleMs,
  nowMs,
  offlineAfterMs = OFFLINE_AFTER_MS,
}: {
  health: HealthSummary | undefined;
  lastSampleMs: number | null;
  nowMs: number;
  offlineAfterMs?: number;
}): UnitStateView {
  const last = health === undefined ? undefined : verdictLabel(health.verdict);
  if (lastSampleMs === null || nowMs - lastSampleMs > offlineAfterMs) {
    const since = lastSampleMs === null ? undefined : sinceText(nowMs - lastSampleMs);
    const label = noDataLabel(since);
    const wasFault = health !== undefined && FAULT_VERDICTS.has(health.verdict);
    return {
      state: 'no-data',
      label,
      reason:
        lastSampleMs === null
          ? 'Has never sent a sample: check the unit’s controller, its network link and its MQTT topic.'
          : `No sample for ${since}${last === undefined ? '' : `; last judged: ${last}`}. Check the unit’s controller and its network link.`,
      rank: wasFault ? 0 : 1,
    };
  }
  if (health === undefined) {
    return { state: 'not-judged', label: NOT_JUDGED_LABEL, reason: 'Not yet judged: the first diagnosis runs once it has samples.', rank: 0 };
  }
  const alarm = firstFinding(health, 'alarm');
  if (FAULT_VERDICTS.has(health.verdict) || alarm !== undefined) {
    const top = alarm ?? firstFinding(health, 'warning');
    return {
      state: 'fault',
      label: FAULT_VERDICTS.has(health.verdict) ? (last as string) : findingTitle((alarm as { code: string }).code),
      reason: top ? shortReason(top.message) : `${last}: ${VERDICT_BASIS_TEXT[health.verdict] ?? 'see the unit’s findings'}.`,
      rank: 0,
    };
  }
  const warning = firstFinding(health, 'warning');
  if (warning !== undefined) {
    return { state: 'warning', label: findingTitle(warning.code), reason: shortReason(warning.message), rank: 0 };
  }
  if (health.verdict === 'insufficient-data') {
    return {
      state: 'not-judged',
      label: last as string,
      reason: insufficientReason(health),
      rank: 1,
    };
  }
  return { state: 'healthy', label: last as string, reason: undefined, rank: 0 };
}

/**
 * Sort key: state worst first, then rank within it.
 * @example compareStates({ state: 'fault', rank: 0 }, { state: 'healthy', rank: 0 }) < 0 // true
 */
export function compareStates(a: Pick<UnitStateView, 'state' | 'rank'>, b: Pick<UnitStateView, 'state' | 'rank'>): number {
  return UNIT_STATES.indexOf(a.state) - UNIT_STATES.indexOf(b.state) || a.rank - b.rank;
}
