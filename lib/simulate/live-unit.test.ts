import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { parseTimestampMs } from '@/lib/contract/telemetry';
import { createLogger } from '@/lib/log/logger';
import { demoFleet } from './demo-fleet';
import { buildFleetModels, parseFleet } from './fleet-models';
import {
  MAX_UNACKED_MESSAGES,
  RECONNECT_RETRY_MS,
  comeBack,
  createTimeouts,
  dropOffNetwork,
  emptyCounters,
  liveUnitOf,
  publishHeld,
  takeSample,
  type LiveDevice,
  type LiveRun,
  type LiveUnit,
} from './live-unit';
import type { PublishedSample } from './machine';

const T0 = Date.UTC(2026, 2, 1, 12);

/** A stand-in for a unit's MQTT connection: publishes wait until the test acknowledges or fails them. */
class FakeDevice implements LiveDevice {
  inFlight = 0;
  connected = true;
  dropped = false;
  closed = false;
  readonly sent: string[] = [];
  private readonly waiting: { resolve: () => void; reject: (e: unknown) => void }[] = [];
  constructor(private readonly connects: 'ok' | 'refused' = 'ok') {}

  connect(): Promise<void> {
    return this.connects === 'ok' ? Promise.resolve() : Promise.reject(new Error('connection refused'));
  }
  publishTelemetry(payload: string): Promise<void> {
    this.sent.push(payload);
    this.inFlight++;
    return new Promise((resolve, reject) => this.waiting.push({ resolve, reject }));
  }
  /** Acknowledges (or fails) the oldest message waiting. */
  settle(error?: Error): void {
    const next = this.waiting.shift()!;
    this.inFlight--;
    if (error) next.reject(error);
    else next.resolve();
  }
  dropUnclean(): void {
    this.dropped = true;
    this.connected = false;
  }
  close(): Promise<void> {
    this.closed = true;
    this.connected = false;
    return Promise.resolve();
  }
}

function setUp(p: { samplesPerMessage?: number; devices?: (() => FakeDevice)[] } = {}) {
  const lines: { level: string; msg: string }[] = [];
  const log = createLogger('test', 'info', (line) => lines.push(JSON.parse(line) as { level: string; msg: string }));
  const timeouts = createTimeouts();
  const next = [...(p.devices ?? [])];
  const run: LiveRun = {
    log,
    samplesPerMessage: p.samplesPerMessage ?? 2,
    counters: emptyCounters(),
    lifecycle: 'running',
    later: timeouts.later,
    newDevice: () => (next.shift() ?? (() => new FakeDevice()))(),
  };
  const fleet = parseFleet({ sites: demoFleet.sites, units: demoFleet.units.filter((u) => u.id === 'qv-01') });
  const unit = liveUnitOf(buildFleetModels(fleet, { seed: 3, noiseScale: 0 }, T0).units[0]!);
  const device = new FakeDevice();
  unit.device = device;
  return { run, unit, device, lines, timeouts };
}

const sample = (ts: number): PublishedSample => ({ ts, rpm: 100 });
const flush = () => new Promise((r) => setTimeout(r, 0));

describe('createTimeouts', () => {
  beforeEach(() => vi.useFakeTimers());
  afterEach(() => vi.useRealTimers());

  it('runs what is due, forgets it, and cancels the rest together', () => {
    const t = createTimeouts();
    const ran: string[] = [];
    t.later(100, () => ran.push('a'));
    t.later(200, () => ran.push('b'));
    vi.advanceTimersByTime(150);
    expect(ran).toEqual(['a']);
    expect(t.size).toBe(1);
    t.clear();
    vi.advanceTimersByTime(1000);
    expect(ran).toEqual(['a']);
    expect(t.size).toBe(0);
  });
});

describe('publishHeld', () => {
  it('sends what the unit holds as one message and counts it once the broker acknowledges', async () => {
    const { run, unit, device } = setUp();
    unit.buffer = [sample(1), sample(2)];
    publishHeld(run, unit);
    expect(unit.buffer).toEqual([]);
    expect(device.sent).toEqual([JSON.stringify([sample(1), sample(2)])]);
    expect(run.counters.messagesSent).toBe(0);
    vi.useFakeTimers({ now: T0, toFake: ['Date'] });
    device.settle();
    await flush();
    vi.useRealTimers();
    expect(run.counters).toEqual({ messagesSent: 1, samplesSent: 2, samplesDropped: 0, messagesFailed: 0, lastPublishMs: T0 });
  });

  it('sends nothing for an empty buffer or a unit off the network', () => {
    const { run, unit, device } = setUp();
    publishHeld(run, unit);
    unit.buffer = [sample(1)];
    unit.device = undefined;
    publishHeld(run, unit);
    expect(unit.buffer).toEqual([]);
    expect(device.sent).toEqual([]);
  });

  it('counts a failed publish, and says so only while the run lasts', async () => {
    const { run, unit, device, lines } = setUp();
    unit.buffer = [sample(1)];
    publishHeld(run, unit);
    device.settle(new Error('connection lost'));
    await flush();
    unit.buffer = [sample(2)];
    publishHeld(run, unit);
    run.lifecycle = 'stopping';
    device.settle(new Error('connection lost'));
    await flush();
    expect(run.counters.messagesFailed).toBe(2);
    expect(lines.filter((l) => l.msg === 'publish failed')).toHaveLength(1);
  });

  it('drops and counts new samples while the broker leaves MAX_UNACKED_MESSAGES unacknowledged, saying so once', async () => {
    const { run, unit, device, lines } = setUp();
    device.inFlight = MAX_UNACKED_MESSAGES;
    for (const ts of [1, 2, 3]) {
      unit.buffer = [sample(ts), sample(ts + 0.5)];
      publishHeld(run, unit);
    }
    expect(run.counters.samplesDropped).toBe(6);
    expect(device.sent).toEqual([]);
    expect(lines.filter((l) => l.msg.startsWith('broker not acknowledging'))).toHaveLength(1);
    // Once it acknowledges again, the next hold-up is reported anew.
    device.inFlight = 0;
    unit.buffer = [sample(4)];
    publishHeld(run, unit);
    expect(unit.dropWarned).toBe(false);
    device.inFlight = MAX_UNACKED_MESSAGES;
    unit.buffer = [sample(5)];
    publishHeld(run, unit);
    expect(lines.filter((l) => l.msg.startsWith('broker not acknowledging'))).toHaveLength(2);
  });
});

describe('takeSample', () => {
  beforeEach(() => vi.useFakeTimers({ now: T0 }));
  afterEach(() => vi.useRealTimers());

  it('holds samples until a message is full, with times that rise even when the clock stands still or steps back', () => {
    const { run, unit, device } = setUp({ samplesPerMessage: 3 });
    takeSample(run, unit);
    takeSample(run, unit);
    expect(device.sent).toHaveLength(0);
    expect(unit.buffer.map((s) => parseTimestampMs(s.ts))).toEqual([T0, T0 + 1]);
    vi.setSystemTime(T0 - 60_000);
    takeSample(run, unit);
    expect(unit.lastMs).toBe(T0 + 2);
    expect(device.sent).toHaveLength(1);
    expect((JSON.parse(device.sent[0]!) as unknown[]).length).toBe(3);
    expect(unit.buffer).toEqual([]);
  });

  it('keeps the machine turning while the unit is off the network, logging nothing', () => {
    const { run, unit } = setUp();
    unit.device = undefined;
    const step = vi.spyOn(unit.model, 'step');
    takeSample(run, unit);
    expect(step).toHaveBeenCalledWith(T0);
    expect(unit.buffer).toEqual([]);
  });
});

describe('dropOffNetwork and comeBack', () => {
  beforeEach(() => vi.useFakeTimers({ now: T0 }));
  afterEach(() => vi.useRealTimers());

  it('drops uncleanly, losing what the unit held, and comes back on a new device after forS', async () => {
    const { run, unit, device, lines } = setUp();
    unit.buffer = [sample(1)];
    dropOffNetwork(run, unit, 60);
    expect(device.dropped).toBe(true);
    expect(unit.device).toBeUndefined();
    expect(unit.buffer).toEqual([]);
    await vi.advanceTimersByTimeAsync(59_999);
    expect(unit.device).toBeUndefined();
    await vi.advanceTimersByTimeAsync(1);
    expect(unit.device).toBeInstanceOf(FakeDevice);
    expect(unit.device).not.toBe(device);
    expect(lines.map((l) => l.msg)).toEqual(['unit dropped off the network (simulated fault)', 'unit back online']);
  });

  it('stays away for good when forS is null, and a unit already away is left alone', async () => {
    const { run, unit, device, timeouts } = setUp();
    dropOffNetwork(run, unit, null);
    dropOffNetwork(run, unit, 10);
    expect(timeouts.size).toBe(0);
    expect(device.dropped).toBe(true);
  });

  it('retries a refused reconnection every RECONNECT_RETRY_MS', async () => {
    const { run, unit, lines } = setUp({ devices: [() => new FakeDevice('refused'), () => new FakeDevice('refused')] });
    unit.device = undefined;
    comeBack(run, unit);
    await vi.advanceTimersByTimeAsync(0);
    expect(unit.device).toBeUndefined();
    await vi.advanceTimersByTimeAsync(RECONNECT_RETRY_MS);
    expect(unit.device).toBeUndefined();
    await vi.advanceTimersByTimeAsync(RECONNECT_RETRY_MS);
    expect(unit.device).toBeInstanceOf(FakeDevice);
    expect(lines.filter((l) => l.msg.startsWith('unit could not reconnect'))).toHaveLength(2);
  });

  it('does not come back once the run stops, closing a connection that lands after the stop', async () => {
    const late = new FakeDevice();
    const { run, unit } = setUp({ devices: [() => late] });
    unit.device = undefined;
    comeBack(run, unit);
    run.lifecycle = 'stopping';
    await vi.advanceTimersByTimeAsync(0);
    expect(unit.device).toBeUndefined();
    expect(late.closed).toBe(true);
    const unused = vi.fn(() => new FakeDevice());
    comeBack({ ...run, newDevice: unused }, unit);
    expect(unused).not.toHaveBeenCalled();
  });
});

describe('liveUnitOf', () => {
  it('starts a unit unconnected, holding nothing', () => {
    const { unit } = setUp();
    const fresh: LiveUnit = liveUnitOf(unit);
    expect({ ...fresh, model: undefined, nameplate: undefined, scenario: undefined }).toEqual({
      model: undefined,
      nameplate: undefined,
      scenario: undefined,
      device: undefined,
      buffer: [],
      timer: undefined,
      lastMs: 0,
      dropWarned: false,
    });
  });
});
