import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import mqtt, { type MqttClient } from 'mqtt';
import { startEmbeddedBroker, type EmbeddedBroker } from '@/lib/broker/embedded';
import { createLogger } from '@/lib/log/logger';
import { freePort } from '@/lib/net/ports';
import { fleetSubset, parseSimulateArgs, runSimulate, USAGE } from './cli';
import { demoFleet } from './demo-fleet';

const log = createLogger('test', 'silent');

function io(env: Record<string, string>, interrupted: Promise<string> = new Promise(() => {})) {
  const out: string[] = [];
  const err: string[] = [];
  return {
    out,
    err,
    io: { stdout: { write: (t: string) => out.push(t) }, stderr: { write: (t: string) => err.push(t) }, env: { LOG_LEVEL: 'silent', ...env }, interrupted },
  };
}

describe('parseSimulateArgs', () => {
  it('reads the options', () => {
    expect(parseSimulateArgs([])).toEqual({ help: false, live: false });
    expect(parseSimulateArgs(['--backfill', '3', '--live', '--rate', '1', '--units', '4', '--seed', '9', '--interval', '30'])).toEqual({
      help: false,
      live: true,
      backfillDays: 3,
      rateHz: 1,
      units: 4,
      seed: 9,
      intervalS: 30,
    });
    expect(parseSimulateArgs(['-h']).help).toBe(true);
  });

  it('names the option that is wrong', () => {
    expect(() => parseSimulateArgs(['--speed', '2'])).toThrow(/--speed/);
    expect(() => parseSimulateArgs(['--rate', 'fast'])).toThrow(/--rate expects .*got "fast"/);
    expect(() => parseSimulateArgs(['--units', '2.5'])).toThrow(/--units expects a whole number/);
    expect(() => parseSimulateArgs(['--backfill', '0'])).toThrow(/--backfill expects/);
    expect(() => parseSimulateArgs(['--live'])).toThrow(/--live goes with --backfill/);
    expect(() => parseSimulateArgs(['--interval', '5'])).toThrow(/--interval and --backfill-rate go with --backfill/);
  });
});

describe('fleetSubset', () => {
  it('keeps the first units and only their sites', () => {
    const sub = fleetSubset(2);
    expect(sub.units.map((u) => u.id)).toEqual(['qv-01', 'qv-02']);
    expect(sub.sites.map((s) => s.id)).toEqual(['quorvenna-ildresk']);
    expect(fleetSubset(undefined)).toBe(demoFleet);
    expect(() => fleetSubset(99)).toThrow(/--units expects at most 14/);
  });
});

describe('runSimulate', () => {
  let broker: EmbeddedBroker;
  let watcher: MqttClient;
  const topics: string[] = [];

  beforeAll(async () => {
    broker = await startEmbeddedBroker({ port: await freePort(), auth: 'open-for-tests' });
    watcher = await mqtt.connectAsync(broker.url, { clientId: 'test-cli-watch', protocolVersion: 4, reconnectPeriod: 0 });
    watcher.on('message', (topic) => topics.push(topic));
    await watcher.subscribeAsync('millrace/#', { qos: 1 });
  });
  afterAll(async () => {
    await watcher.endAsync(true);
    await broker.close();
  });

  it('prints its usage', async () => {
    const t = io({});
    expect(await runSimulate(['--help'], t.io, log)).toBe(0);
    expect(t.out.join('')).toBe(USAGE);
  });

  it('exits 2 naming a bad option or setting', async () => {
    const t = io({});
    expect(await runSimulate(['--rate', '0'], t.io, log)).toBe(2);
    expect(t.err.join('')).toMatch(/--rate expects/);
    const u = io({ MQTT_URL: 'http://example' });
    expect(await runSimulate([], u.io, log)).toBe(2);
    expect(u.err.join('')).toMatch(/MQTT_URL/);
  });

  it('says which broker it could not reach and what to do', async () => {
    const port = await freePort();
    const t = io({ MQTT_URL: `mqtt://127.0.0.1:${port}` });
    expect(await runSimulate(['--units', '1'], t.io, log)).toBe(1);
    expect(t.err.join('')).toMatch(new RegExp(`127\\.0\\.0\\.1:${port}.*connection refused.*npm start.*MQTT_URL`));
  });

  it('writes a history, goes live and stops cleanly on a signal', async () => {
    let interrupt!: (signal: string) => void;
    const interrupted = new Promise<string>((resolve) => (interrupt = resolve));
    const t = io({ MQTT_URL: broker.url }, interrupted);
    const running = runSimulate(['--backfill', '0.01', '--live', '--units', '2', '--rate', '10', '--backfill-rate', '0'], t.io, log);
    const until = Date.now() + 10_000;
    while (!topics.includes('millrace/quorvenna-ildresk/qv-02/presence') && Date.now() < until) await new Promise((r) => setTimeout(r, 20));
    interrupt('SIGINT');
    expect(await running).toBe(0);
    const out = t.out.join('');
    // 0.01 days at 10 s is 86 samples per unit.
    expect(out).toMatch(/history written to mqtt:\/\/127\.0\.0\.1:\d+: 172 samples in 2 messages for 2 units/);
    expect(out).toMatch(/publishing 2 units/);
    expect(out).toMatch(/stopped: \d+ samples/);
  });
});
