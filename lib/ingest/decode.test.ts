import { describe, expect, it } from 'vitest';
import { boundText, createTelemetryDecoder, decodePresencePayload, jsonDepth, pgSafeText, MAX_PAYLOAD_BYTES } from './decode';
import { parseUnitTopic, sharedTelemetryFilter } from './topics';
import { sampleAt } from './sample-block';

const now = Date.UTC(2026, 2, 1, 12);
const decoder = createTelemetryDecoder({ retentionDays: 90 });
const decode = (text: string | Buffer) => decoder.decode(typeof text === 'string' ? Buffer.from(text) : text, now);

describe('decoding a telemetry payload', () => {
  it('takes one sample object or an array of them', () => {
    expect(decode(JSON.stringify({ ts: now, rpm: 300, vab: 230 })).samples.count).toBe(1);
    expect(decode(JSON.stringify([{ ts: now, rpm: 300, vab: 230 }, { ts: now - 1000, rpm: 301, vab: 231 }])).samples.count).toBe(2);
  });

  it('accepts ISO-8601 with an offset and rounds epoch milliseconds to whole ones', () => {
    const { samples } = decode(JSON.stringify([{ ts: '2026-03-01T13:00:00+01:00', rpm: 1, vab: 1 }, { ts: now - 0.6, rpm: 1, vab: 1 }]));
    expect([samples.ts[0], samples.ts[1]]).toEqual([now, now - 1]);
  });

  it('names unknown fields without failing the sample', () => {
    const result = decode(JSON.stringify({ ts: now, rpm: 300, vab: 230, gearboxC: 55 }));
    expect(result.samples.count).toBe(1);
    expect(result.unknownFields).toEqual(['gearboxC']);
    expect('gearboxC' in sampleAt(result.samples, 0)).toBe(false);
    expect(sampleAt(result.samples, 0)).toEqual({ ts: now, rpm: 300, vab: 230 });
  });

  it('judges "now" by the time the message was received', () => {
    const later = createTelemetryDecoder({ retentionDays: 90 }).decode(Buffer.from(JSON.stringify({ ts: now + 10 * 60_000, rpm: 1, vab: 1 })), now + 6 * 60_000);
    expect(later.samples.count).toBe(1);
    expect(decode(JSON.stringify({ ts: now + 10 * 60_000, rpm: 1, vab: 1 })).quarantined[0]!.reason).toMatch(/more than 5 minutes in the future/);
  });

  it('refuses a payload just over the limit and reads one at it', () => {
    const sample = JSON.stringify({ ts: now, rpm: 300, vab: 230 });
    const pad = (size: number) => Buffer.from(`[${sample}${' '.repeat(size - sample.length - 2)}]`);
    expect(decode(pad(MAX_PAYLOAD_BYTES)).samples.count).toBe(1);
    const over = decode(pad(MAX_PAYLOAD_BYTES + 1));
    expect(over.samples.count).toBe(0);
    expect(over.quarantined[0]!.reason).toMatch(/over the 256.0 KiB limit/);
    expect(over.quarantined[0]!.payloadBytes).toBe(MAX_PAYLOAD_BYTES + 1);
  });

  it('measures nesting outside strings only', () => {
    expect(jsonDepth('[{"a":[1]}]')).toBe(3);
    expect(jsonDepth('{"a":"[[[[[[\\"[["}')).toBe(1);
    expect(jsonDepth('['.repeat(100), 32)).toBe(33);
  });

  it('keeps quarantine text free of NUL and bounded', () => {
    expect(pgSafeText('a\u0000b')).toBe('a\\u0000b');
    expect(boundText('abcdef', 3)).toBe('abc… (6 bytes in all)');
    expect(boundText('abc', 3, 10)).toBe('abc… (10 bytes in all)');
    expect(boundText('abc', 3)).toBe('abc');
  });
});

describe('presence payloads', () => {
  it('reads online and offline, and an empty (cleared) retained message as no state', () => {
    expect(decodePresencePayload(Buffer.from('online'))).toEqual({ ok: true, presence: 'online' });
    expect(decodePresencePayload(Buffer.from(' offline\n'))).toEqual({ ok: true, presence: 'offline' });
    expect(decodePresencePayload(Buffer.alloc(0))).toEqual({ ok: true, presence: null });
    const bad = decodePresencePayload(Buffer.from('{"state":"up"}'));
    expect(bad.ok).toBe(false);
  });
});

describe('unit topics (contract, section 3)', () => {
  it('splits site and unit and refuses ids that are not slugs', () => {
    expect(parseUnitTopic('millrace/thrennow-isk/wt-03/telemetry')).toEqual({ ok: true, kind: 'telemetry', siteId: 'thrennow-isk', unitId: 'wt-03' });
    expect(parseUnitTopic('millrace/thrennow-isk/wt-03/presence')).toMatchObject({ ok: true, kind: 'presence' });
    expect(parseUnitTopic('millrace/North/wt-03/telemetry')).toMatchObject({ ok: false, reason: expect.stringMatching(/site id "North"/) });
    expect(parseUnitTopic('other/a/b/telemetry').ok).toBe(false);
  });

  it('subscribes through the shared subscription the contract names', () => {
    expect(sharedTelemetryFilter()).toBe('$share/millrace-ingest/millrace/+/+/telemetry');
  });
});
