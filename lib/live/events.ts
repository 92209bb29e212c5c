/**
 * What the live feed carries: a unit stored new samples, or was diagnosed.
 * Workers (the ingester, the live diagnosis) publish these; the web side
 * passes them on to open pages (app/api/live). Ids only, never readings: a
 * page that hears of a change reads the new state through its own queries.
 */
import { z } from 'zod';
import { SLUG } from '@/lib/contract/nameplate';

const slug = z.string().regex(SLUG);

export const liveEventSchema = z.discriminatedUnion('type', [
  z.object({
    type: z.literal('samples'),
    siteId: slug,
    unitId: slug,
    /** Newest sample time of the unit in the batch, ISO-8601 UTC. */
    lastTs: z.string(),
  }),
  z.object({
    type: z.literal('diagnosis'),
    siteId: slug,
    unitId: slug,
    verdict: z.string().max(64),
    /** The verdict before this diagnosis; absent on a unit's first. */
    previousVerdict: z.string().max(64).optional(),
  }),
  z.object({
    /** An alert of the unit opened, changed or cleared (lib/alerts): its pages read the new state. */
    type: z.literal('alert'),
    siteId: slug,
    unitId: slug,
  }),
  z.object({
    /** A unit's MQTT password was rotated or revoked: the embedded broker disconnects its device (lib/devices). */
    type: z.literal('device-credentials'),
    siteId: slug,
    unitId: slug,
  }),
]);

export type LiveEvent = z.infer<typeof liveEventSchema>;
export type SamplesEvent = Extract<LiveEvent, { type: 'samples' }>;
export type DiagnosisEvent = Extract<LiveEvent, { type: 'diagnosis' }>;

/** PostgreSQL's LISTEN/NOTIFY channel of the feed. */
export const LIVE_CHANNEL = 'millrace_live';

/**
 * Most bytes of one NOTIFY payload. PostgreSQL refuses a payload of 8000
 * bytes or more (default build); a margin is kept.
 */
export const MAX_NOTIFY_BYTES = 7900;

/**
 * Packs events into as few JSON payloads as fit under `maxBytes` each (one
 * NOTIFY each). An event too large on its own is left out (ids are slugs of
 * at most 64 characters, so none is).
 * @example packPayloads([{ type: 'samples', siteId: 'a', unitId: 'b', lastTs: '2026-12-02T10:00:00.000Z' }]).length // 1
 */
export function packPayloads(events: readonly LiveEvent[], maxBytes = MAX_NOTIFY_BYTES): string[] {
  const payloads: string[] = [];
  let parts: string[] = [];
  let bytes = 2; // the brackets
  for (const event of events) {
    const text = JSON.stringify(event);
    const size = Buffer.byteLength(text) + 1; // and its comma
    if (size + 2 > maxBytes) continue;
    if (bytes + size > maxBytes) {
      payloads.push(`[${parts.join(',')}]`);
      parts = [];
      bytes = 2;
    }
    parts.push(text);
    bytes += size;
  }
  if (parts.length > 0) payloads.push(`[${parts.join(',')}]`);
  return payloads;
}

/** The events of one NOTIFY payload; anything that is not a valid event is left out and counted. */
export function unpackPayload(payload: string): { events: LiveEvent[]; invalid: number } {
  let raw: unknown;
  try {
    raw = JSON.parse(payload);
  } catch {
    return { events: [], invalid: 1 };
  }
  if (!Array.isArray(raw)) return { events: [], invalid: 1 };
  const events: LiveEvent[] = [];
  let invalid = 0;
  for (const item of raw) {
    const parsed = liveEventSchema.safeParse(item);
    if (parsed.success) events.push(parsed.data);
    else invalid++;
  }
  return { events, invalid };
}
