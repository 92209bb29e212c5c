/**
 * The life of one alert (contract section 7), as pure steps from one state to
 * the next: opened when a condition has held past its on-delay; `goneSince`
 * set when it stops holding and the alert cleared once it has been gone for
 * the hold-off; a return within the hold-off re-opens the same alert;
 * acknowledged by a person (who, when, a note); shelved until a time, still
 * evaluated, and back to where it was when the time is up. A cleared alert
 * nobody acknowledged stays in the crews' list until someone does.
 *
 * Chattering (ISA-18.2 / IEC 62682: an alarm that changes state repeatedly in
 * a short time): three or more returns within a minute. The steps count them;
 * notifications to people are held to one while an alert chatters. Webhooks
 * carry every change, as the contract asks.
 */
import type { AlertEventType, AlertState } from '@/lib/contract/alerts';

/** What the lifecycle needs of an alert; times in epoch ms. */
export interface AlertLife {
  readonly state: AlertState;
  readonly openedAtMs: number;
  readonly changedAtMs: number;
  /** The condition stopped holding then (null while it holds). */
  readonly goneSinceMs: number | null;
  readonly acknowledgedAtMs: number | null;
  readonly clearedAtMs: number | null;
  readonly shelvedUntilMs: number | null;
  /** Returns within the chatter window, and when the window began. */
  readonly flaps: number;
  readonly flapWindowStartMs: number | null;
}

/** One change, with the state it leaves and the state it enters. */
export interface AlertChange {
  readonly type: AlertEventType;
  readonly from: AlertState | null;
  readonly to: AlertState;
}

export interface AlertStep {
  readonly life: AlertLife;
  readonly changes: readonly AlertChange[];
}

/** Returns within this window count towards chattering (common practice: one minute). */
export const CHATTER_WINDOW_MS = 60_000;
/** Returns within the window that make an alert chattering (the alerts issue: three or more in a minute). */
export const CHATTER_RETURNS = 3;
/** An alert active longer than this is stale (common practice in alarm management: 24 hours). */
export const STALE_AFTER_MS = 24 * 3_600_000;

/** A new alert, active from `nowMs`. */
export function openAlert(nowMs: number): AlertStep {
  return {
    life: {
      state: 'active',
      openedAtMs: nowMs,
      changedAtMs: nowMs,
      goneSinceMs: null,
      acknowledgedAtMs: null,
      clearedAtMs: null,
      shelvedUntilMs: null,
      flaps: 0,
      flapWindowStartMs: null,
    },
    changes: [{ type: 'opened', from: null, to: 'active' }],
  };
}

/** The state a shelved alert goes back to. */
function unshelvedState(life: AlertLife): AlertState {
  return life.acknowledgedAtMs !== null ? 'acknowledged' : 'active';
}

function unshelveIfDue(life: AlertLife, nowMs: number, changes: AlertChange[]): AlertLife {
  if (life.state !== 'shelved' || life.shelvedUntilMs === null || nowMs < life.shelvedUntilMs) return life;
  const to = unshelvedState(life);
  changes.push({ type: 'unshelved', from: 'shelved', to });
  return { ...life, state: to, shelvedUntilMs: null, changedAtMs: nowMs };
}

function countReturn(life: AlertLife, nowMs: number): Pick<AlertLife, 'flaps' | 'flapWindowStartMs'> {
  const inWindow = life.flapWindowStartMs !== null && nowMs - life.flapWindowStartMs <= CHATTER_WINDOW_MS;
  return inWindow ? { flaps: life.flaps + 1, flapWindowStartMs: life.flapWindowStartMs } : { flaps: 1, flapWindowStartMs: nowMs };
}

/**
 * One evaluation of an alert not yet cleared: the condition `holds` or not at `nowMs`.
 * Gone for `holdOffMs` → cleared; back within it → the same alert re-opened (acknowledged stays
 * acknowledged: it is the same occurrence); a shelf whose time is up comes down first.
 * @example stepAlert(openAlert(0).life, { holds: false, nowMs: 1000, holdOffMs: 60_000 }).life.goneSinceMs // 1000
 */
export function stepAlert(alert: AlertLife, { holds, nowMs, holdOffMs }: { holds: boolean; nowMs: number; holdOffMs: number }): AlertStep {
  if (alert.clearedAtMs !== null) return { life: alert, changes: [] };
  const changes: AlertChange[] = [];
  let life = unshelveIfDue(alert, nowMs, changes);
  if (holds && life.goneSinceMs !== null) {
    life = { ...life, goneSinceMs: null, changedAtMs: nowMs, ...countReturn(life, nowMs) };
    changes.push({ type: 'reopened', from: life.state, to: life.state });
  } else if (!holds && life.goneSinceMs === null) {
    life = { ...life, goneSinceMs: nowMs };
  } else if (!holds && life.goneSinceMs !== null && nowMs - life.goneSinceMs >= holdOffMs) {
    changes.push({ type: 'cleared', from: life.state, to: 'cleared' });
    life = { ...life, state: 'cleared', clearedAtMs: nowMs, changedAtMs: nowMs, shelvedUntilMs: null };
  }
  return { life, changes };
}

/** A person takes the alert (active, shelved or cleared); taking it twice changes nothing. */
export function acknowledgeAlert(alert: AlertLife, nowMs: number): AlertStep {
  if (alert.acknowledgedAtMs !== null) return { life: alert, changes: [] };
  const to: AlertState = alert.state === 'active' ? 'acknowledged' : alert.state;
  return {
    life: { ...alert, state: to, acknowledgedAtMs: nowMs, changedAtMs: nowMs },
    changes: [{ type: 'acknowledged', from: alert.state, to }],
  };
}

/** Hidden from the list until `untilMs` (later than now), still evaluated; a cleared alert cannot be shelved. */
export function shelveAlert(alert: AlertLife, untilMs: number, nowMs: number): AlertStep {
  if (!(untilMs > nowMs)) throw new RangeError(`shelve until ${new Date(untilMs).toISOString()}: not after now`);
  if (alert.state === 'cleared') return { life: alert, changes: [] };
  return {
    life: { ...alert, state: 'shelved', shelvedUntilMs: untilMs, changedAtMs: nowMs },
    changes: [{ type: 'shelved', from: alert.state, to: 'shelved' }],
  };
}

/** Whether the alert chatters now (three or more returns within a minute). */
export function isChattering(alert: AlertLife, nowMs: number): boolean {
  return alert.flaps >= CHATTER_RETURNS && alert.flapWindowStartMs !== null && nowMs - alert.flapWindowStartMs <= CHATTER_WINDOW_MS;
}

/** Whether the alert has been active, untaken, for over a day. */
export function isStale(alert: AlertLife, nowMs: number): boolean {
  return alert.state === 'active' && nowMs - alert.openedAtMs > STALE_AFTER_MS;
}

/** Whether the alert belongs in the crews' list: not cleared, or cleared with nobody having taken it. */
export function inCrewList(alert: Pick<AlertLife, 'state' | 'acknowledgedAtMs'>): boolean {
  return alert.state !== 'cleared' || alert.acknowledgedAtMs === null;
}
