/**
 * MQTT topics of the data contract (section 3) as the ingester sees them:
 * `millrace/<siteId>/<unitId>/telemetry` and `.../presence`.
 */
import { SLUG } from '@/lib/contract/nameplate';
import { describeValue } from '@/lib/contract/telemetry';

/** Root of every millrace topic. */
export const TOPIC_ROOT = 'millrace';

/** Telemetry of every unit (plain subscription, for a broker without shared subscriptions). */
export const TELEMETRY_FILTER = `${TOPIC_ROOT}/+/+/telemetry`;

/** Presence of every unit (retained, `online` / `offline`). */
export const PRESENCE_FILTER = `${TOPIC_ROOT}/+/+/presence`;

/** Share group of the ingesters (contract, section 3). */
export const DEFAULT_SHARE_GROUP = 'millrace-ingest';

/** The MQTT 5 shared subscription through which several ingesters split the telemetry. */
export function sharedTelemetryFilter(group: string = DEFAULT_SHARE_GROUP): string {
  return `$share/${group}/${TELEMETRY_FILTER}`;
}

export type UnitTopic =
  | { ok: true; kind: 'telemetry' | 'presence'; siteId: string; unitId: string }
  | { ok: false; siteId?: string; unitId?: string; reason: string };

/**
 * Splits a unit topic into its site and unit. A topic the subscriptions let
 * through but whose ids are not slugs comes back with a reason.
 * @example parseUnitTopic('millrace/thrennow-isk/wt-03/telemetry') // { ok: true, kind: 'telemetry', siteId: 'thrennow-isk', unitId: 'wt-03' }
 */
export function parseUnitTopic(topic: string): UnitTopic {
  const parts = topic.split('/');
  if (parts.length !== 4 || parts[0] !== TOPIC_ROOT || (parts[3] !== 'telemetry' && parts[3] !== 'presence')) {
    return { ok: false, reason: `topic ${describeValue(topic)} is not millrace/<siteId>/<unitId>/telemetry or .../presence` };
  }
  const [, siteId = '', unitId = '', kind] = parts;
  if (!SLUG.test(siteId)) {
    return { ok: false, siteId, unitId, reason: `site id ${describeValue(siteId)} in the topic is not a slug (1 to 64 of a-z, 0-9 and -)` };
  }
  if (!SLUG.test(unitId)) {
    return { ok: false, siteId, unitId, reason: `unit id ${describeValue(unitId)} in the topic is not a slug (1 to 64 of a-z, 0-9 and -)` };
  }
  return { ok: true, kind: kind as 'telemetry' | 'presence', siteId, unitId };
}
