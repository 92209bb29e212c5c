import { describe, expect, it } from 'vitest';
import { MAX_NOTIFY_BYTES, packPayloads, unpackPayload, type LiveEvent } from './events';

const event = (i: number): LiveEvent => ({ type: 'samples', siteId: 'tarn-edge', unitId: `unit-${i}`, lastTs: '2026-12-02T10:00:00.000Z' });

describe('NOTIFY payloads of the live feed', () => {
  it('packs events into payloads under the limit (PostgreSQL refuses 8000 bytes or more) and unpacks them all, in order', () => {
    const events = Array.from({ length: 500 }, (_, i) => event(i));
    const payloads = packPayloads(events);
    expect(payloads.length).toBeGreaterThan(1);
    for (const p of payloads) expect(Buffer.byteLength(p)).toBeLessThanOrEqual(MAX_NOTIFY_BYTES);
    expect(payloads.flatMap((p) => unpackPayload(p).events)).toEqual(events);
  });

  it('counts what is not a live event instead of passing it on', () => {
    expect(unpackPayload('not json')).toEqual({ events: [], invalid: 1 });
    expect(unpackPayload(JSON.stringify([event(1), { type: 'samples', siteId: 'Bad Site' }]))).toEqual({ events: [event(1)], invalid: 1 });
  });
});
