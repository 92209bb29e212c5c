import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import mqtt, { type MqttClient } from 'mqtt';
import { startEmbeddedBroker, type EmbeddedBroker } from '@/lib/broker/embedded';
import { fleetSchema } from '@/lib/contract/nameplate';
import { parseTelemetrySample, parseTimestampMs } from '@/lib/contract/telemetry';
import { createLogger } from '@/lib/log/logger';
import { freePort } from '@/lib/net/ports';
import { backfill, payloadsOf, MAX_BACKFILL_PAYLOAD_BYTES } from './backfill';
import { demoFleet } from './demo-fleet';
import type { PublishedSample } from './machine';

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
