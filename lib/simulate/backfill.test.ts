import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import mqtt, { type MqttClient } from 'mqtt';
import { startEmbeddedBroker, type EmbeddedBroker } from '@/lib/broker/embedded';
import { fleetSchema } from '@/lib/contract/nameplate';
import { parseTelemetrySample, parseTimestampMs } from '@/lib/contract/telemetry';
import { createLogger } from '@/lib/log/logger';
import { freePort } from '@/lib/net/ports';
import {
  DEFAULT_BACKFILL_SAMPLES_PER_S,
  MAX_BACKFILL_PAYLOAD_BYTES,
  backfill,
  backfillSettings,
  createUploadFlow,
  historyChunk,
  historyTimes,
  payloadsOf,
} from './backfill';
import { demoFleet } from './demo-fleet';
import type { PublishedSample, UnitModel } from './machine';

const log = createLogger('test', 'silent');
const fleet = fleetSchema.parse(demoFleet);
const DAY = 86_400_000;

describe('backfill against the embedded broker', () => {
  let broker: EmbeddedBroker;
  let watcher: MqttClient;
  const samplesByUnit = new Map<string, PublishedSample[]>();
  let messages = 0;

  beforeAll(async () => {
    broker = await startEmbeddedBroker({ port: await freePort(), auth: 'open-for-tests' });
    watcher = await mqtt.connectAsync(broker.url, { clientId: 'test-history-watch', protocolVersion: 4, reconnectPeriod: 0 });
    watcher.on('message', (topic, payload) => {
      if (!topic.endsWith('/telemetry')) return;
      messages++;
      const unit = topic.split('/')[2]!;
      samplesByUnit.set(unit, [...(samplesByUnit.get(unit) ?? []), ...(JSON.parse(payload.toString()) as PublishedSample[])]);
    });
    await watcher.subscribeAsync('millrace/+/+/telemetry', { qos: 1 });
  });
  afterAll(async () => {
    await watcher.endAsync(true);
    await broker.close();
  });

  it('publishes every sample of the history, ending now, less the offline unit gap', async () => {
    const endMs = Date.now() - 1000;
    const units = fleet.units.filter((u) => u.id === 'qv-01' || u.id === 'pd-03');
    const sites = fleet.sites.filter((s) => units.some((u) => u.siteId === s.id));
    // pd-03's communications gap starts 5.5 days after the epoch: put it 30 minutes before the end.
    const faultEpochMs = endMs - 5.5 * DAY - 30 * 60_000;
    const result = await backfill({
      brokerUrl: broker.url,
      fleet: { sites, units },
      days: 0.05,
      intervalS: 10,
      samplesPerMessage: 100,
      maxSamplesPerS: 0,
      endMs,
      faultEpochMs,
      log,
      clientIdPrefix: 'test-history',
    });
    // 0.05 days at 10 s: 432 sample times per unit; the last 30 minutes of pd-03 (181 times) fall in its gap.
    const perUnit = 432;
    const inGap = 181;
    expect(result.units).toBe(2);
    expect(result.samplesInGaps).toBe(inGap);
    expect(result.samples).toBe(2 * perUnit - inGap);
    // qv-01: 5 messages of up to 100; pd-03: 3 (the third with the 51 samples before its gap).
    expect(result.messages).toBe(8);
    await new Promise<void>((resolve, reject) => {
      const until = Date.now() + 5000;
      const poll = () => (messages >= 8 ? resolve() : Date.now() > until ? reject(new Error('messages missing')) : setTimeout(poll, 20));
      poll();
    });
    expect(samplesByUnit.get('qv-01')!.length).toBe(perUnit);
    expect(samplesByUnit.get('pd-03')!.length).toBe(perUnit - inGap);
    const times = samplesByUnit.get('qv-01')!.map((s) => parseTimestampMs(s.ts)!);
    expect(times.at(-1)).toBe(endMs);
    expect(times[0]).toBe(endMs - (perUnit - 1) * 10_000);
    expect(times.every((t, i) => i === 0 || t - times[i - 1]! === 10_000)).toBe(true);
    const gapStart = endMs - 30 * 60_000;
    expect(samplesByUnit.get('pd-03')!.every((s) => parseTimestampMs(s.ts)! < gapStart)).toBe(true);
    for (const s of [...samplesByUnit.get('qv-01')!, ...samplesByUnit.get('pd-03')!]) {
      expect(parseTelemetrySample(s).ok).toBe(true);
    }
    expect(result.from).toBe(new Date(endMs - (perUnit - 1) * 10_000).toISOString());
    expect(result.to).toBe(new Date(endMs).toISOString());
  });

  it('names bad options', async () => {
    await expect(backfill({ brokerUrl: broker.url, days: -1, log })).rejects.toThrow(/days.*-1/);
    await expect(backfill({ brokerUrl: broker.url, days: 1, intervalS: 0, log })).rejects.toThrow(/intervalS.*got 0/);
    await expect(backfill({ brokerUrl: broker.url, days: 1, endMs: Date.now() + 3_600_000, log })).rejects.toThrow(/endMs.*future/);
  });

  it('refuses with the broker URL when nothing listens there', async () => {
    const url = `mqtt://127.0.0.1:${await freePort()}`;
    await expect(backfill({ brokerUrl: url, days: 0.01, log, fleet: { sites: fleet.sites, units: fleet.units.slice(0, 1) } })).rejects.toThrow(
      /connection refused.*npm start/,
    );
  });
});

describe('payloadsOf', () => {
  it('splits a message that would exceed the payload limit, losing no sample', () => {
    const sample: PublishedSample = { ts: '2026-03-01T00:00:00.000+00:00', rpm: 200.25, vab: 400.12, vbc: 400.31, vca: 399.98, ia: 10.123, ib: 10.111, ic: 10.131, kw: 6.1234 };
    const many = Array.from({ length: 3000 }, () => sample);
    const parts = payloadsOf(many);
    expect(parts.length).toBeGreaterThan(1);
    expect(parts.reduce((n, p) => n + p.count, 0)).toBe(3000);
    for (const p of parts) expect(Buffer.byteLength(p.json)).toBeLessThanOrEqual(MAX_BACKFILL_PAYLOAD_BYTES);
    expect(payloadsOf(many.slice(0, 10))).toHaveLength(1);
  });
});

describe('backfillSettings and historyTimes', () => {
  it('fills in the defaults and names an option out of range', () => {
    expect(backfillSettings({ days: 3 })).toEqual({ days: 3, intervalS: 10, perMessage: 360, maxInFlight: 4, pace: DEFAULT_BACKFILL_SAMPLES_PER_S });
    expect(() => backfillSettings({ days: 1, samplesPerMessage: 2.5 })).toThrow(/samplesPerMessage must be a whole number from 1 to 100000, got 2\.5/);
    expect(() => backfillSettings({ days: 1, maxInFlight: 0 })).toThrow(/maxInFlight.*got 0/);
    expect(() => backfillSettings({ days: 1, maxSamplesPerS: Number.NaN })).toThrow(/maxSamplesPerS.*got NaN/);
  });

  it('lays the sample times out back from the end, one interval apart', () => {
    const nowMs = Date.UTC(2026, 2, 1);
    expect(historyTimes({ days: 1, intervalS: 10 }, undefined, nowMs)).toEqual({ endMs: nowMs, count: 8640, stepMs: 10_000, firstMs: nowMs - 8639 * 10_000 });
    expect(historyTimes({ days: 0.05, intervalS: 10 }, nowMs - 1000, nowMs)).toMatchObject({ endMs: nowMs - 1000, count: 432 });
    expect(historyTimes({ days: 0, intervalS: 10 }, undefined, nowMs).count).toBe(0);
    expect(() => historyTimes({ days: 1, intervalS: 10 }, nowMs + 1, nowMs)).toThrow(/endMs must not be in the future, got 2026-03-01T00:00:00\.001Z/);
  });
});

describe('historyChunk', () => {
  it('steps the unit over its sample times and leaves out those in its communications gap', () => {
    const times: number[] = [];
    const model = {
      step: (tMs: number) => {
        times.push(tMs);
        const inHistoryGap = tMs >= 1_000_030_000;
        return { sample: { ts: tMs, rpm: 1 }, truth: { effects: { inHistoryGap } } } as unknown as ReturnType<UnitModel['step']>;
      },
    };
    const chunk = historyChunk(model, { firstMs: 1_000_000_000, stepMs: 10_000 }, 2, 5);
    expect(times).toEqual([1_000_020_000, 1_000_030_000, 1_000_040_000]);
    expect(chunk).toEqual({ samples: [{ ts: 1_000_020_000, rpm: 1 }], inGaps: 2 });
  });
});

describe('createUploadFlow', () => {
  /** A device whose publishes wait until the test settles them. */
  function device() {
    const waiting: { resolve: () => void; reject: (e: unknown) => void }[] = [];
    const sent: string[] = [];
    return {
      sent,
      publishTelemetry: (json: string) => {
        sent.push(json);
        return new Promise<void>((resolve, reject) => waiting.push({ resolve, reject }));
      },
      settle: (error?: Error) => {
        const next = waiting.shift()!;
        if (error) next.reject(error);
        else next.resolve();
      },
    };
  }
  const tick = () => new Promise((r) => setTimeout(r, 0));

  it('keeps at most maxInFlight messages waiting for their acknowledgement, and counts what was acknowledged', async () => {
    const d = device();
    const flow = createUploadFlow({ maxInFlight: 2, pace: 0 }, Date.now());
    expect(await flow.send(d, { json: 'a', count: 3 })).toBe(true);
    expect(await flow.send(d, { json: 'b', count: 3 })).toBe(true);
    let third = false;
    const sending = flow.send(d, { json: 'c', count: 1 }).then((ok) => (third = ok));
    await tick();
    expect(d.sent).toEqual(['a', 'b']);
    d.settle();
    await sending;
    expect(third).toBe(true);
    expect(d.sent).toEqual(['a', 'b', 'c']);
    let drained = false;
    const draining = flow.drain().then(() => (drained = true));
    d.settle();
    await tick();
    expect(drained).toBe(false);
    d.settle();
    await draining;
    expect(flow.counts()).toEqual({ messages: 3, samples: 7, firstError: undefined });
  });

  it('holds the average pace', async () => {
    const d = device();
    const started = Date.now();
    const flow = createUploadFlow({ maxInFlight: 10, pace: 1000 }, started);
    await flow.send(d, { json: 'a', count: 50 });
    await flow.send(d, { json: 'b', count: 50 });
    // 100 samples at 1000 a second may not leave before 100 ms.
    expect(Date.now() - started).toBeGreaterThanOrEqual(95);
  });

  it('stops at the first failure: later sends refuse, a waiting one is woken, drain waits for what is out', async () => {
    const d = device();
    const flow = createUploadFlow({ maxInFlight: 1, pace: 0 }, Date.now());
    await flow.send(d, { json: 'a', count: 1 });
    const waiting = flow.send(d, { json: 'b', count: 1 });
    d.settle(new Error('connection lost'));
    expect(await waiting).toBe(false);
    expect(flow.ok()).toBe(false);
    expect(await flow.send(d, { json: 'c', count: 1 })).toBe(false);
    await flow.drain();
    expect(d.sent).toEqual(['a']);
    expect(flow.counts()).toMatchObject({ messages: 0, samples: 0, firstError: new Error('connection lost') });
    // A stop on request keeps the first reason.
    flow.fail(new Error('stopped on request'));
    expect((flow.counts().firstError as Error).message).toBe('connection lost');
  });
});
