/**
 * The live demo fleet: every unit is its own MQTT device, taking a sample
 * every 1/rateHz seconds and publishing them `samplesPerMessage` at a time
 * (QoS 1) on its telemetry topic, with retained presence and last will.
 * The simulator never touches the database: what the product shows of it
 * came through the broker and the ingester.
 */
import type { Logger } from '@/lib/log/logger';
import { AppError } from '@/lib/errors/app-error';
import { demoFleet } from './demo-fleet';
import { UnitDevice, redactUrl, type CredentialsFor } from './device';
import { liveOutage } from './faults';
import { buildFleetModels, parseFleet, type FleetModelOptions, type SimulatedUnit } from './fleet-models';
import type { PublishedSample } from './machine';

export { backfill, type BackfillOptions, type BackfillResult } from './backfill';

/** Samples per second per unit by default. */
export const DEFAULT_RATE_HZ = 2;
/** Samples per message by default (a message every two seconds per unit). */
export const DEFAULT_SAMPLES_PER_MESSAGE = 4;
/**
 * Messages a unit keeps while the broker does not acknowledge (a logger's
 * store-and-forward memory); beyond it the oldest new data is dropped and
 * counted.
 */
export const MAX_UNACKED_MESSAGES = 200;

export interface SimulatorOptions extends FleetModelOptions {
  brokerUrl: string;
  log: Logger;
  rateHz?: number | undefined;
  samplesPerMessage?: number | undefined;
  username?: string | undefined;
  password?: string | undefined;
  /** Each unit's own credentials (a broker that checks who publishes where); else `username`/`password` for all. */
  credentialsFor?: CredentialsFor | undefined;
  /** Client ids are `<prefix>-<unitId>`; default `millrace-sim`. */
  clientIdPrefix?: string | undefined;
}

/** What the simulator reports about itself. */
export interface SimulatorState {
  /** Named so as not to clash with a health report's own `status`. */
  lifecycle: 'running' | 'stopping' | 'stopped';
  startedAt: string;
  broker: string;
  seed: number;
  faultEpoch: string;
  rateHz: number;
  samplesPerMessage: number;
  units: number;
  unitsPublishing: number;
  unitsOffline: string[];
  /** Messages and samples the broker acknowledged. */
  messagesSent: number;
  samplesSent: number;
  /** Samples dropped because the broker stopped acknowledging (see MAX_UNACKED_MESSAGES). */
  samplesDropped: number;
  /** Messages whose publish failed (e.g. lost in a dropped connection). */
  messagesFailed: number;
  lastPublishAt: string | null;
}

export interface Simulator {
  /** Flushes what each unit holds, says `offline` for each and disconnects. */
  stop(): Promise<void>;
  state(): SimulatorState;
}

interface LiveUnit extends SimulatedUnit {
  device: UnitDevice | undefined;
  buffer: PublishedSample[];
  timer: NodeJS.Timeout | undefined;
  lastMs: number;
  dropWarned: boolean;
}

function checkRange(name: string, value: number, min: number, max: number, integer = false): number {
  if (!Number.isFinite(value) || value < min || value > max || (integer && !Number.isInteger(value))) {
    throw new AppError('bad-input', 'simulate', `${name} must be ${integer ? 'a whole number ' : ''}from ${min} to ${max}, got ${value}`);
  }
  return value;
}

/**
 * Starts the live fleet; resolves once every unit is connected. A broker
 * that cannot be reached rejects with an AppError naming its URL.
 * @example const sim = await startSimulator({ brokerUrl: 'mqtt://127.0.0.1:1883', log }); sim.state().unitsPublishing // 14
 */
export async function startSimulator(options: SimulatorOptions): Promise<Simulator> {
  const { brokerUrl, log } = options;
  const rateHz = checkRange('rateHz', options.rateHz ?? DEFAULT_RATE_HZ, 0.01, 50);
  const samplesPerMessage = checkRange('samplesPerMessage', options.samplesPerMessage ?? DEFAULT_SAMPLES_PER_MESSAGE, 1, 1000, true);
  const fleet = parseFleet(options.fleet ?? demoFleet);
  const startedMs = Date.now();
  const { units: models, faults, seed } = buildFleetModels(fleet, options, startedMs);
  const prefix = options.clientIdPrefix ?? 'millrace-sim';
  const periodMs = 1000 / rateHz;
  const counters = { messagesSent: 0, samplesSent: 0, samplesDropped: 0, messagesFailed: 0, lastPublishMs: 0 };
  let lifecycle: SimulatorState['lifecycle'] = 'running';
  const timeouts = new Set<NodeJS.Timeout>();
  const later = (ms: number, fn: () => void) => {
    const t = setTimeout(() => {
      timeouts.delete(t);
      fn();
    }, ms);
    timeouts.add(t);
  };

  const newDevice = (u: SimulatedUnit) =>
    new UnitDevice({
      brokerUrl,
      siteId: u.nameplate.siteId,
      unitId: u.nameplate.id,
      clientId: `${prefix}-${u.nameplate.id}`,
      username: options.credentialsFor?.(u.nameplate.siteId, u.nameplate.id)?.username ?? options.username,
      password: options.credentialsFor?.(u.nameplate.siteId, u.nameplate.id)?.password ?? options.password,
      log,
      presence: true,
    });

  const units: LiveUnit[] = models.map((m) => ({ ...m, device: undefined, buffer: [], timer: undefined, lastMs: 0, dropWarned: false }));
  const connected = await Promise.allSettled(
    units.map(async (u) => {
      const device = newDevice(u);
      await device.connect();
      u.device = device;
    }),
  );
  const failure = connected.find((r): r is PromiseRejectedResult => r.status === 'rejected');
  if (failure !== undefined) {
    await Promise.all(units.map((u) => u.device?.close(0)));
    throw failure.reason;
  }
  log.info('demo fleet connected', { broker: redactUrl(brokerUrl), units: units.length, rateHz, samplesPerMessage, seed });

  const publish = (u: LiveUnit) => {
    const device = u.device;
    const samples = u.buffer;
    u.buffer = [];
    if (device === undefined || samples.length === 0) return;
    if (device.inFlight >= MAX_UNACKED_MESSAGES) {
      counters.samplesDropped += samples.length;
      if (!u.dropWarned) {
        u.dropWarned = true;
        log.warn('broker not acknowledging: dropping new samples until it does', { unit: u.nameplate.id, unacked: device.inFlight });
      }
      return;
    }
    u.dropWarned = false;
    device.publishTelemetry(JSON.stringify(samples)).then(
      () => {
        counters.messagesSent++;
        counters.samplesSent += samples.length;
        counters.lastPublishMs = Date.now();
      },
      (error: unknown) => {
        counters.messagesFailed++;
        if (lifecycle === 'running' && u.device === device) log.warn('publish failed', { unit: u.nameplate.id, samples: samples.length, error });
      },
    );
  };

  const tick = (u: LiveUnit) => {
    // Timestamps strictly rise even if the clock steps back.
    const t = Math.max(Date.now(), u.lastMs + 1);
    u.lastMs = t;
    const { sample } = u.model.step(t);
    // A unit that is down logs nothing, but its machine keeps turning.
    if (u.device === undefined) return;
    u.buffer.push(sample);
    if (u.buffer.length >= samplesPerMessage) publish(u);
  };

  const comeBack = (u: LiveUnit) => {
    if (lifecycle !== 'running') return;
    const device = newDevice(u);
    device.connect().then(
      () => {
        if (lifecycle !== 'running') return void device.close(0);
        u.device = device;
        log.info('unit back online', { unit: u.nameplate.id });
      },
      (error: unknown) => {
        log.warn('unit could not reconnect, retrying in 5 s', { unit: u.nameplate.id, error });
        later(5000, () => comeBack(u));
      },
    );
  };

  units.forEach((u, i) => {
    // Spread the units over one sample period so their messages do not all land at once.
    later((i * periodMs) / units.length, () => {
      tick(u);
      u.timer = setInterval(() => tick(u), periodMs);
    });
    const outage = liveOutage(u.scenario.faults, faults);
    if (outage !== undefined) {
      later(outage.afterS * 1000, () => {
        const device = u.device;
        if (device === undefined) return;
        u.device = undefined;
        u.buffer = [];
        device.dropUnclean();
        log.info('unit dropped off the network (simulated fault)', { unit: u.nameplate.id, backInS: outage.forS });
        if (outage.forS !== null) later(outage.forS * 1000, () => comeBack(u));
      });
    }
  });

  return {
    state: () => ({
      lifecycle,
      startedAt: new Date(startedMs).toISOString(),
      broker: redactUrl(brokerUrl),
      seed,
      faultEpoch: new Date(faults.epochMs).toISOString(),
      rateHz,
      samplesPerMessage,
      units: units.length,
      unitsPublishing: units.filter((u) => u.device?.connected === true).length,
      unitsOffline: units.filter((u) => u.device?.connected !== true).map((u) => u.nameplate.id),
      messagesSent: counters.messagesSent,
      samplesSent: counters.samplesSent,
      samplesDropped: counters.samplesDropped,
      messagesFailed: counters.messagesFailed,
      lastPublishAt: counters.lastPublishMs === 0 ? null : new Date(counters.lastPublishMs).toISOString(),
    }),
    stop: async () => {
      if (lifecycle !== 'running') return;
      lifecycle = 'stopping';
      for (const t of timeouts) clearTimeout(t);
      timeouts.clear();
      for (const u of units) {
        if (u.timer !== undefined) clearInterval(u.timer);
        publish(u);
      }
      await Promise.all(units.map((u) => u.device?.close()));
      for (const u of units) u.device = undefined;
      lifecycle = 'stopped';
      log.info('demo fleet stopped', { messagesSent: counters.messagesSent, samplesSent: counters.samplesSent });
    },
  };
}
