import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import mqtt, { type MqttClient } from 'mqtt';
import type { BrokerIdentity } from '@/lib/broker/access';
import { startEmbeddedBroker, type EmbeddedBroker } from '@/lib/broker/embedded';
import { fleetSchema } from '@/lib/contract/nameplate';
import { parseTelemetrySample } from '@/lib/contract/telemetry';
import { createLogger } from '@/lib/log/logger';
import { freePort } from '@/lib/net/ports';
import { demoFleet } from './demo-fleet';
import { emptyCounters } from './live-unit';
import { simulatorState, startSimulator } from './simulator';

const log = createLogger('test', 'silent');
const fleet = fleetSchema.parse(demoFleet);
const pick = (...ids: string[]) => {
  const units = fleet.units.filter((u) => ids.includes(u.id));
  return { sites: fleet.sites.filter((s) => units.some((u) => u.siteId === s.id)), units };
};

interface Received {
  topic: string;
  text: string;
  retain: boolean;
}

async function subscriber(url: string, clientId: string, into: Received[]): Promise<MqttClient> {
  const client = await mqtt.connectAsync(url, { clientId, protocolVersion: 4, reconnectPeriod: 0 });
  client.on('message', (topic, payload, packet) => into.push({ topic, text: payload.toString(), retain: packet.retain }));
  await client.subscribeAsync('millrace/#', { qos: 1 });
  return client;
}

async function waitFor(what: string, ok: () => boolean, timeoutMs = 10_000): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (!ok()) {
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 20));
  }
}

describe('startSimulator against the embedded broker', () => {
  let broker: EmbeddedBroker;
  const clients: MqttClient[] = [];

  beforeAll(async () => {
    broker = await startEmbeddedBroker({ port: await freePort(), auth: 'open-for-tests' });
  });
  afterAll(async () => {
    await Promise.all(clients.map((c) => c.endAsync(true)));
    await broker.close();
  });

  it('publishes presence and valid telemetry per unit, and a dropped unit leaves a retained offline will', async () => {
    const received: Received[] = [];
    clients.push(await subscriber(broker.url, 'test-watch', received));
    const sim = await startSimulator({
      brokerUrl: broker.url,
      fleet: pick('qv-01', 'pd-03', 'sd-02'),
      rateHz: 10,
      samplesPerMessage: 2,
      log,
      seed: 5,
      offlineAfterS: 1,
      offlineForS: null,
      clientIdPrefix: 'test-sim',
    });
    const presence = (unit: string) =>
      received.filter((r) => r.topic.endsWith(`/${unit}/presence`)).map((r) => r.text);
    const telemetry = (unit: string) => received.filter((r) => r.topic.endsWith(`/${unit}/telemetry`));
    try {
      await waitFor('presence online', () => ['qv-01', 'pd-03', 'sd-02'].every((u) => presence(u).includes('online')));
      expect(received.some((r) => r.topic === 'millrace/quorvenna-ildresk/qv-01/presence')).toBe(true);
      await waitFor('telemetry of every unit', () => ['qv-01', 'pd-03', 'sd-02'].every((u) => telemetry(u).length >= 2));
      for (const message of received.filter((r) => r.topic.endsWith('/telemetry'))) {
        const samples = JSON.parse(message.text) as unknown[];
        expect(Array.isArray(samples)).toBe(true);
        expect(samples.length).toBe(2);
        for (const s of samples) expect(parseTelemetrySample(s).ok).toBe(true);
      }
      // pd-03 drops off uncleanly one second in; the broker publishes its will.
      await waitFor('last will of pd-03', () => presence('pd-03').includes('offline'));
      expect(sim.state().unitsOffline).toEqual(['pd-03']);
      const countAtDrop = telemetry('pd-03').length;
      await new Promise((r) => setTimeout(r, 500));
      expect(telemetry('pd-03').length).toBeLessThanOrEqual(countAtDrop + 3);
      expect(telemetry('qv-01').length).toBeGreaterThan(2);

      // A newcomer gets the will as the retained presence.
      const late: Received[] = [];
      clients.push(await subscriber(broker.url, 'test-late', late));
      await waitFor('retained presence', () => late.some((r) => r.topic.endsWith('/pd-03/presence')));
      const retained = late.find((r) => r.topic.endsWith('/pd-03/presence'))!;
      expect(retained).toEqual({ topic: 'millrace/pludvarro-emskeen/pd-03/presence', text: 'offline', retain: true });
      expect(late.find((r) => r.topic.endsWith('/qv-01/presence'))).toMatchObject({ text: 'online', retain: true });
    } finally {
      await sim.stop();
    }
    const state = sim.state();
    expect(state.lifecycle).toBe('stopped');
    expect(state.units).toBe(3);
    expect(state.messagesSent).toBeGreaterThan(5);
    expect(state.samplesDropped).toBe(0);
    // Everything acknowledged reached the subscriber.
    await waitFor('last messages', () => presence('qv-01').at(-1) === 'offline');
    const delivered = received
      .filter((r) => r.topic.endsWith('/telemetry'))
      .reduce((n, r) => n + (JSON.parse(r.text) as unknown[]).length, 0);
    expect(delivered).toBeGreaterThanOrEqual(state.samplesSent);
    expect(presence('sd-02').at(-1)).toBe('offline');
  });

  it('rejects with the broker URL when nothing listens there', async () => {
    const url = `mqtt://127.0.0.1:${await freePort()}`;
    await expect(startSimulator({ brokerUrl: url, fleet: pick('qv-01'), log })).rejects.toThrow(
      new RegExp(`${url.replace(/[.]/g, '\\.')}.*connection refused.*npm start.*MQTT_URL`),
    );
  });

  it('names a bad rate', async () => {
    await expect(startSimulator({ brokerUrl: broker.url, rateHz: 0, log })).rejects.toThrow(/rateHz.*got 0/);
    await expect(startSimulator({ brokerUrl: broker.url, samplesPerMessage: 2.5, log })).rejects.toThrow(/samplesPerMessage.*2\.5/);
  });

  it('names what is wrong with a bad fleet', async () => {
    const bad = { sites: [], units: [{ ...demoFleet.units[0], poles: 7 }] };
    await expect(startSimulator({ brokerUrl: broker.url, fleet: bad, log })).rejects.toThrow(/units\[0\]\.poles: must be an even number, got 7/);
  });
});

describe('startSimulator credentials', () => {
  it('signs each unit in with its own credentials when it has them, else with the shared ones', async () => {
    const seen: string[] = [];
    const units = pick('qv-01', 'pd-03');
    const owner = new Map(units.units.map((u) => [`${u.id}-own`, u]));
    const broker = await startEmbeddedBroker({
      port: await freePort(),
      auth: {
        verify: async (username, password): Promise<BrokerIdentity | undefined> => {
          seen.push(`${username}:${password.toString()}`);
          const u = owner.get(username) ?? (username === 'shared' ? units.units.find((x) => x.id === 'pd-03') : undefined);
          return u === undefined ? undefined : { kind: 'device', username, siteId: u.siteId, unitId: u.id };
        },
      },
    });
    try {
      const sim = await startSimulator({
        brokerUrl: broker.url,
        fleet: units,
        log,
        username: 'shared',
        password: 'shared-secret',
        credentialsFor: (_siteId, unitId) => (unitId === 'qv-01' ? { username: 'qv-01-own', password: 'own-secret' } : undefined),
        clientIdPrefix: 'test-creds',
      });
      await sim.stop();
      expect(seen.sort()).toEqual(['qv-01-own:own-secret', 'shared:shared-secret']);
    } finally {
      await broker.close();
    }
  });
});

describe('simulatorState', () => {
  it('reports the run: counts, units publishing and offline, times as ISO text', () => {
    const counters = { ...emptyCounters(), messagesSent: 3, samplesSent: 12, lastPublishMs: Date.UTC(2026, 2, 1, 12) };
    const units = [
      { nameplate: fleet.units[0]!, device: { connected: true } },
      { nameplate: fleet.units[1]!, device: undefined },
      { nameplate: fleet.units[2]!, device: { connected: false } },
    ];
    const state = simulatorState({ lifecycle: 'running', counters }, units, {
      startedMs: Date.UTC(2026, 2, 1, 11),
      broker: 'mqtt://127.0.0.1:1883',
      seed: 4,
      faults: { epochMs: Date.UTC(2026, 1, 22) },
      rateHz: 2,
      samplesPerMessage: 4,
    });
    expect(state).toEqual({
      lifecycle: 'running',
      startedAt: '2026-03-01T11:00:00.000Z',
      broker: 'mqtt://127.0.0.1:1883',
      seed: 4,
      faultEpoch: '2026-02-22T00:00:00.000Z',
      rateHz: 2,
      samplesPerMessage: 4,
      units: 3,
      unitsPublishing: 1,
      unitsOffline: [fleet.units[1]!.id, fleet.units[2]!.id],
      messagesSent: 3,
      samplesSent: 12,
      samplesDropped: 0,
      messagesFailed: 0,
      lastPublishAt: '2026-03-01T12:00:00.000Z',
    });
    expect(simulatorState({ lifecycle: 'stopped', counters: emptyCounters() }, [], { startedMs: 0, broker: 'b', seed: 1, faults: { epochMs: 0 }, rateHz: 1, samplesPerMessage: 1 }).lastPublishAt).toBeNull();
  });
});
