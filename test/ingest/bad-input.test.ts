/**
 * Bad input never crashes the ingester and never disappears: every malformed
 * payload lands in quarantine with a reason a person can act on, and the good
 * samples next to a bad one are stored. The rules checked are those of the
 * data contract (shared/contract.md, sections 1 and 3): required fields,
 * physical sense (negative rpm, NaN, above 10 kV, more than 5 minutes in the
 * future, before 2000), registered units under their own site.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startIngester, type Ingester } from '@/lib/ingest/ingester';
import { backendDescription, createTestDatabase, type TestDatabase } from '@/test/support/backend';
import {
  openPublisher,
  queryRows,
  registerFleet,
  startTestBroker,
  testFleet,
  testLogger,
  testTag,
  waitFor,
  type Outgoing,
  type TestBroker,
} from '@/test/support/ingest';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 40, hydroUnits: 1 });
const site = fleet.sites[0]!.id;
const otherSite = fleet.sites[1]!.id;
const now = Date.now();
const good = (i: number) => ({ ts: now - 60_000 + i * 1000, rpm: 250, vab: 231, vbc: 230, vca: 232, kw: 3 });

interface Case {
  name: string;
  payload: string | Buffer;
  /** Topic override (default: the case's own registered unit). */
  topic?: string;
  /** Quarantine rows expected, each a pattern its reason must match, with its sample index. */
  quarantined: Array<{ reason: RegExp; sampleIndex?: number | null }>;
  /** Rows expected in telemetry_samples for the case's unit. */
  stored: number;
}

const deep = (levels: number) => `${'['.repeat(levels)}${']'.repeat(levels)}`;

const cases: Case[] = [
  { name: 'not JSON (cut short)', payload: '{"ts": 1767225600000, "rpm": ', quarantined: [{ reason: /^payload is not JSON \(.+\)/ }], stored: 0 },
  { name: 'plain text', payload: 'rpm=250 vab=231', quarantined: [{ reason: /^payload is not JSON/ }], stored: 0 },
  { name: 'empty payload', payload: '', quarantined: [{ reason: /^payload is empty/ }], stored: 0 },
  { name: 'a bare number', payload: '42', quarantined: [{ reason: /must be a JSON sample object or an array of them, got 42/ }], stored: 0 },
  { name: 'JSON null', payload: 'null', quarantined: [{ reason: /must be a JSON sample object or an array of them, got null/ }], stored: 0 },
  { name: 'an empty array', payload: '[]', quarantined: [{ reason: /empty array: it holds no samples/ }], stored: 0 },
  {
    name: 'rpm of the wrong type',
    payload: JSON.stringify({ ...good(0), rpm: 'fast' }),
    quarantined: [{ reason: /^rpm: expected a number of rev\/min, got "fast"$/, sampleIndex: null }],
    stored: 0,
  },
  {
    name: 'NaN as a string',
    payload: JSON.stringify({ ...good(0), vab: 'NaN' }),
    quarantined: [{ reason: /^vab: expected a number of volts, got "NaN"$/ }],
    stored: 0,
  },
  {
    name: 'negative rpm',
    payload: JSON.stringify({ ...good(0), rpm: -5 }),
    quarantined: [{ reason: /^rpm: -5 rev\/min is below 0, outside physical sense$/ }],
    stored: 0,
  },
  {
    name: 'timestamp an hour ahead',
    payload: JSON.stringify({ ...good(0), ts: now + 3_600_000 }),
    quarantined: [{ reason: /^ts: .+ is more than 5 minutes in the future$/ }],
    stored: 0,
  },
  {
    name: 'timestamp before 2000',
    payload: JSON.stringify({ ...good(0), ts: '1999-12-31T23:00:00Z' }),
    quarantined: [{ reason: /^ts: 1999-12-31T23:00:00.000Z is before 2000$/ }],
    stored: 0,
  },
  {
    name: 'timestamp past retention',
    payload: JSON.stringify({ ...good(0), ts: now - 100 * 86_400_000 }),
    quarantined: [{ reason: /^ts: .+ is older than the 90-day retention \(RETENTION_DAYS\)/ }],
    stored: 0,
  },
  {
    name: 'timestamp without an offset',
    payload: JSON.stringify({ ...good(0), ts: '2026-03-01T10:00:00' }),
    quarantined: [{ reason: /^ts: expected an ISO-8601 time with offset or epoch milliseconds, got "2026-03-01T10:00:00"$/ }],
    stored: 0,
  },
  {
    name: 'required vab missing',
    payload: JSON.stringify({ ts: now - 1000, rpm: 250 }),
    quarantined: [{ reason: /^vab: expected a number of volts, got nothing$/ }],
    stored: 0,
  },
  {
    name: 'line voltage above 10 kV',
    payload: JSON.stringify({ ...good(0), vbc: 12_000 }),
    quarantined: [{ reason: /^vbc: 12000 volts is above 10000, outside physical sense$/ }],
    stored: 0,
  },
  {
    name: 'a number too large for JSON doubles (Infinity)',
    payload: `{"ts": ${now - 1000}, "rpm": 250, "vab": 1e999}`,
    quarantined: [{ reason: /^vab: expected a number of volts, got Infinity|^vab: Infinity volts is above 10000/ }],
    stored: 0,
  },
  {
    name: 'a boolean for hz',
    payload: JSON.stringify({ ...good(0), hz: true }),
    quarantined: [{ reason: /^hz: expected a number of hertz, got true$/ }],
    stored: 0,
  },
  {
    name: 'several problems in one sample',
    payload: JSON.stringify({ ts: 'soon', rpm: -1 }),
    quarantined: [{ reason: /ts: expected an ISO-8601 time.*; rpm: -1 rev\/min is below 0.*; vab: expected a number of volts, got nothing/ }],
    stored: 0,
  },
  {
    name: 'over 256 KiB',
    payload: JSON.stringify(Array.from({ length: 4500 }, (_, i) => ({ ...good(0), ts: now - 4_000_000 + i * 100 }))),
    quarantined: [{ reason: /^payload of \d+\.\d KiB is over the 256\.0 KiB limit of one message; send fewer samples per message$/ }],
    stored: 0,
  },
  {
    name: 'nested 5,000 levels deep',
    payload: deep(5000),
    quarantined: [{ reason: /^payload nests more than 32 levels deep/ }],
    stored: 0,
  },
  {
    name: 'a list where rpm should be',
    payload: JSON.stringify({ ...good(0), rpm: JSON.parse(deep(10)) }),
    quarantined: [{ reason: /^rpm: expected a number of rev\/min, got a list$/ }],
    stored: 0,
  },
  {
    name: 'bytes that are not UTF-8',
    payload: Buffer.from([0x7b, 0x22, 0x74, 0x73, 0x22, 0x3a, 0xff, 0xfe, 0x7d]),
    quarantined: [{ reason: /^payload is not UTF-8 text/ }],
    stored: 0,
  },
  {
    name: 'a NUL byte inside the text',
    payload: Buffer.concat([Buffer.from('{"ts": 1, "note": "a'), Buffer.from([0]), Buffer.from('b"}')]),
    quarantined: [{ reason: /^payload is not JSON/ }],
    stored: 0,
  },
  {
    name: 'an array mixing good and bad samples',
    payload: JSON.stringify([good(0), { ...good(1), rpm: -1 }, good(2), 'sample', good(4), [good(5)]]),
    quarantined: [
      { reason: /^rpm: -1 rev\/min is below 0/, sampleIndex: 1 },
      { reason: /^expected a sample object, got "sample"$/, sampleIndex: 3 },
      { reason: /^expected a sample object, got a list$/, sampleIndex: 5 },
    ],
    stored: 3,
  },
  {
    name: 'the same ts twice in one message',
    payload: JSON.stringify([good(0), { ...good(0), rpm: 251 }]),
    quarantined: [{ reason: /repeats sample \[0\] of this message; only the first was kept/, sampleIndex: 1 }],
    stored: 1,
  },
  {
    name: 'a unit nobody registered',
    payload: JSON.stringify([good(0), good(1)]),
    topic: `millrace/${site}/ghost-${tag}/telemetry`,
    quarantined: [{ reason: new RegExp(`^unit "ghost-${tag}" is not registered; register it with .npx millrace units import FLEET.json. before it publishes \\(2 samples in this message\\)$`) }],
    stored: 0,
  },
  {
    name: 'a unit published under the wrong site',
    payload: JSON.stringify(good(0)),
    topic: `millrace/${otherSite}/kf-${tag}-w27/telemetry`,
    quarantined: [{ reason: new RegExp(`^unit "kf-${tag}-w27" is registered under site "${site}", not "${otherSite}"`) }],
    stored: 0,
  },
  {
    name: 'a site id that is not a slug',
    payload: JSON.stringify(good(0)),
    topic: `millrace/Karrow_Fell/kf-${tag}-w28/telemetry`,
    quarantined: [{ reason: /^site id "Karrow_Fell" in the topic is not a slug/ }],
    stored: 0,
  },
  {
    name: 'a presence that is neither online nor offline',
    payload: 'maybe',
    topic: `millrace/${site}/kf-${tag}-w29/presence`,
    quarantined: [{ reason: /^presence must be "online" or "offline", got "maybe"$/ }],
    stored: 0,
  },
];

const unknownFieldCase = { unit: `kf-${tag}-w40`, payloads: [JSON.stringify({ ...good(0), gearboxC: 61 }), JSON.stringify({ ...good(1), gearboxC: 62, yawDeg: 3 })] };

const topicOf = (c: Case, i: number) => c.topic ?? `millrace/${site}/kf-${tag}-w${i + 1}/telemetry`;
const unitOf = (c: Case, i: number) => topicOf(c, i).split('/')[2]!;

describe(`bad input lands in quarantine with its reason (${backendDescription()})`, () => {
  let db: TestDatabase;
  let broker: TestBroker;
  let ingester: Ingester;
  const logLines: string[] = [];

  beforeAll(async () => {
    expect(cases.length).toBeGreaterThanOrEqual(20);
    expect(Buffer.byteLength(cases.find((c) => c.name === 'over 256 KiB')!.payload)).toBeGreaterThan(256 * 1024);
    db = await createTestDatabase();
    broker = await startTestBroker();
    process.stdout.write(`bad-input: ${db.handle.location}, ${broker.description}\n`);
    await registerFleet(db.handle, fleet);
    ingester = await startIngester({
      handle: db.handle,
      brokerUrl: broker.url,
      mqtt5: broker.mqtt5,
      shareGroup: broker.shareGroup,
      clientId: `bad-input-${tag}`,
      connections: 2,
      batchSamples: 500,
      batchMs: 50,
      bufferSamples: 10_000,
      log: testLogger('ingest', logLines),
      sessionExpirySeconds: 120,
    });
    await ingester.ready();
    const publisher = await openPublisher(broker.url, { mqtt5: broker.mqtt5 });
    const messages: Outgoing[] = cases.map((c, i) => ({ topic: topicOf(c, i), payload: c.payload }));
    for (const payload of unknownFieldCase.payloads) messages.push({ topic: `millrace/${site}/${unknownFieldCase.unit}/telemetry`, payload });
    await publisher.publishAll(messages);
    await publisher.close();
    const expectedQuarantine = cases.reduce((n, c) => n + c.quarantined.length, 0);
    await waitFor('every message committed', () => ingester.state().counters.messages >= messages.length && ingester.state().buffer.samples === 0 && ingester.state().counters.quarantined >= expectedQuarantine);
  });

  afterAll(async () => {
    await ingester?.stop();
    await broker?.close();
    await db?.drop();
  });

  it.each(cases.map((c, i) => [c.name, c, i] as const))('%s', async (_name, c, i) => {
    const unit = unitOf(c, i);
    const rows = await queryRows<{ reason: string; sample_index: number | null; payload: string; payload_bytes: number; topic: string }>(
      db.handle,
      'select reason, sample_index, payload, payload_bytes, topic from quarantine where topic = $1 order by sample_index nulls first, id',
      [topicOf(c, i)],
    );
    expect(rows.map((r) => r.reason)).toHaveLength(c.quarantined.length);
    c.quarantined.forEach((expected, k) => {
      const row = rows[k]!;
      expect(row.reason).toMatch(expected.reason);
      if (expected.sampleIndex !== undefined) expect(row.sample_index).toBe(expected.sampleIndex);
      // The payload is kept, bounded, and its full size recorded: the whole message's bytes, or
      // for a sample refused out of an array, the bytes of that sample as JSON.
      expect(row.payload.length).toBeLessThanOrEqual(4096 + 40);
      const bytes =
        row.sample_index === null
          ? Buffer.byteLength(c.payload)
          : Buffer.byteLength(JSON.stringify((JSON.parse(String(c.payload)) as unknown[])[row.sample_index]));
      expect(Number(row.payload_bytes)).toBe(bytes);
    });
    const [stored] = await queryRows<{ n: number }>(
      db.handle,
      'select count(*)::int as n from telemetry_samples s join units u on u.key = s.unit_key where u.id = $1',
      [unit],
    );
    expect(Number(stored!.n)).toBe(c.stored);
  });

  it('keeps the size of an oversized payload and only the head of its text', async () => {
    const c = cases.find((x) => x.name === 'over 256 KiB')!;
    const i = cases.indexOf(c);
    const [row] = await queryRows<{ payload: string; payload_bytes: number }>(db.handle, 'select payload, payload_bytes from quarantine where topic = $1', [topicOf(c, i)]);
    expect(Number(row!.payload_bytes)).toBe(Buffer.byteLength(c.payload));
    expect(row!.payload).toMatch(/… \(\d+ bytes in all\)$/);
  });

  it('stores samples with unknown fields, without those fields, and warns once per unit', async () => {
    const [stored] = await queryRows<{ n: number }>(
      db.handle,
      'select count(*)::int as n from telemetry_samples s join units u on u.key = s.unit_key where u.id = $1',
      [unknownFieldCase.unit],
    );
    expect(Number(stored!.n)).toBe(2);
    const warnings = logLines.map((l) => JSON.parse(l) as Record<string, unknown>).filter((l) => l.msg?.toString().startsWith('unknown fields') && l.unit === unknownFieldCase.unit);
    expect(warnings).toHaveLength(1);
    expect(ingester.state().counters.unknownFieldMessages).toBe(2);
  });

  it('counts every quarantined item and is still running', async () => {
    // On a shared broker other tests' retained presence reaches this ingester too (and is quarantined as unknown).
    const [all] = await queryRows<{ n: number }>(db.handle, 'select count(*)::int as n from quarantine');
    const [ours] = await queryRows<{ n: number }>(db.handle, 'select count(*)::int as n from quarantine where topic like $1', [`%${tag}%`]);
    expect(Number(ours!.n)).toBe(cases.reduce((n, c) => n + c.quarantined.length, 0));
    const state = ingester.state();
    expect(state.counters.quarantined).toBe(Number(all!.n));
    expect(state.status).toBe('ok');
  });
});
