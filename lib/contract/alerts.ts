/**
 * The alerts of contract section 7: the condition codes, the states an alert
 * is in, and the changes a webhook announces. Shared by db/schema, lib/alerts
 * and the API.
 */
import { z } from 'zod';

/** Condition codes (fixed by the contract). */
export const ALERT_CONDITIONS = [
  'demagnetisation',
  'shorted-turns',
  'speed-sensor',
  'ke-trend',
  'overspeed',
  'stator-temperature',
  'offline',
  'bad-telemetry',
  'nameplate-suspect',
] as const;
export type AlertCondition = (typeof ALERT_CONDITIONS)[number];

/** `active`: holds, nobody took it; `acknowledged`: holds, someone did; `cleared`: gone past the hold-off; `shelved`: hidden until a time. */
export const ALERT_STATES = ['active', 'acknowledged', 'cleared', 'shelved'] as const;
export type AlertState = (typeof ALERT_STATES)[number];
export const alertStateSchema = z.enum(ALERT_STATES);

/** What happened to an alert; the webhook's `type` is `alert.` + one of the first six. */
export const ALERT_EVENT_TYPES = ['opened', 'acknowledged', 'cleared', 'reopened', 'shelved', 'unshelved', 'escalated'] as const;
export type AlertEventType = (typeof ALERT_EVENT_TYPES)[number];

/** Webhook message types (contract section 7). */
export const WEBHOOK_TYPES = ['alert.opened', 'alert.acknowledged', 'alert.cleared', 'alert.reopened', 'alert.shelved', 'alert.unshelved'] as const;
export type WebhookType = (typeof WEBHOOK_TYPES)[number];

/** The alert object of the API and of webhooks (contract section 7). */
export interface AlertObject {
  readonly id: string;
  readonly siteId: string;
  readonly unitId: string;
  readonly condition: AlertCondition;
  readonly severity: 'info' | 'warning' | 'alarm';
  readonly state: AlertState;
  readonly openedAt: string;
  readonly changedAt: string;
  readonly message: string;
  readonly value: number | null;
  readonly limit: number | null;
  readonly acknowledgedAt: string | null;
  readonly acknowledgedBy: string | null;
  readonly clearedAt: string | null;
  readonly shelvedUntil: string | null;
  readonly url: string;
}
