/**
 * The live demo fleet: every unit is its own MQTT device, taking a sample
 * every 1/rateHz seconds and publishing them `samplesPerMessage` at a time
 * (QoS 1) on its telemetry topic, with retained presence and last will.
 * The simulator never touches the database: what the product shows of it
 * came through the broker and the ingester.
 */
import { demoFleet } from './demo-fleet';
import { deviceForUnit, redactUrl, type BrokerAccess } from './device';
import { liveOutage, type FaultSettings } from './faults';
import { buildFleetModels, checkRange, parseFleet, type FleetModelOptions } from './fleet-models';
import {
  createTimeouts,
  dropOffNetwork,
  emptyCounters,
  liveUnitOf,
  publishHeld,
  takeSample,
  type Lifecycle,
  type LiveRun,
  type LiveUnit,
} from './live-unit';

export { backfill, type BackfillOptions, type BackfillResult } from './backfill';

/** Samples per second per unit by default. */
export const DEFAULT_RATE_HZ = 2;
/** Samples per message by default (a message every two seconds per unit). */
export const DEFAULT_SAMPLES_PER_MESSAGE = 4;

export interface SimulatorOptions extends FleetModelOptions, BrokerAccess {
  rateHz?: number | undefined;
  samplesPerMessage?: number | undefined;
  /** Client ids are `<prefix>-<unitId>`; default `millrace-sim`. */
  clientIdPrefix?: string | undefined;
}

/** What the simulator reports about itself. */
export interface SimulatorState {
  /** Named so as not to clash with a health report's own `status`. */
  lifecycle: Lifecycle;
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
  /** Samples dropped because the broker stopped acknowledging (see MAX_UNACKED_MESSAGES in live-unit.ts). */
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
  const timeouts = createTimeouts();
  const run: LiveRun = {
    log,
    samplesPerMessage,
    counters: emptyCounters(),
    lifecycle: 'running',
    later: timeouts.later,
    newDevice: (u) => deviceForUnit(options, u.nameplate, { clientId: `${prefix}-${u.nameplate.id}`, presence: true }),
  };
  const units = models.map(liveUnitOf);
  await connectEvery(run, units);
  log.info('demo fleet connected', { broker: redactUrl(brokerUrl), units: units.length, rateHz, samplesPerMessage, seed });
  scheduleUnits(run, units, 1000 / rateHz, faults);
  const about = { startedMs, broker: redactUrl(brokerUrl), seed, faults, rateHz, samplesPerMessage };
  return {
    state: () => simulatorState(run, units, about),
    stop: async () => {
      if (run.lifecycle !== 'running') return;
      run.lifecycle = 'stopping';
      timeouts.clear();
      await closeEvery(run, units);
      run.lifecycle = 'stopped';
      log.info('demo fleet stopped', { messagesSent: run.counters.messagesSent, samplesSent: run.counters.samplesSent });
    },
  };
}

/** Connects every unit; if one cannot connect, closes those that did and rejects with its error. */
async function connectEvery(run: LiveRun, units: readonly LiveUnit[]): Promise<void> {
  const connected = await Promise.allSettled(
    units.map(async (u) => {
      const device = run.newDevice(u);
      await device.connect();
      u.device = device;
    }),
  );
  const failure = connected.find((r): r is PromiseRejectedResult => r.status === 'rejected');
  if (failure !== undefined) {
    await Promise.all(units.map((u) => u.device?.close(0)));
    throw failure.reason;
  }
}

/** Starts each unit's sample clock, and its simulated network outage if its faults plan one. */
function scheduleUnits(run: LiveRun, units: readonly LiveUnit[], periodMs: number, faults: FaultSettings): void {
  units.forEach((u, i) => {
    // Spread the units over one sample period so their messages do not all land at once.
    run.later((i * periodMs) / units.length, () => {
      takeSample(run, u);
      u.timer = setInterval(() => takeSample(run, u), periodMs);
    });
    const outage = liveOutage(u.scenario.faults, faults);
    if (outage !== undefined) run.later(outage.afterS * 1000, () => dropOffNetwork(run, u, outage.forS));
  });
}

/** Stops every unit's clock, publishes what each holds and closes its device (it says `offline`). */
async function closeEvery(run: LiveRun, units: readonly LiveUnit[]): Promise<void> {
  for (const u of units) {
    if (u.timer !== undefined) clearInterval(u.timer);
    publishHeld(run, u);
  }
  await Promise.all(units.map((u) => u.device?.close()));
  for (const u of units) u.device = undefined;
}

/** The run's report: fixed facts of the start, then the units and counts now. */
export function simulatorState(
  run: Pick<LiveRun, 'lifecycle' | 'counters'>,
  units: readonly { readonly nameplate: { readonly id: string }; readonly device: { readonly connected: boolean } | undefined }[],
  about: { startedMs: number; broker: string; seed: number; faults: FaultSettings; rateHz: number; samplesPerMessage: number },
): SimulatorState {
  const { counters } = run;
  return {
    lifecycle: run.lifecycle,
    startedAt: new Date(about.startedMs).toISOString(),
    broker: about.broker,
    seed: about.seed,
    faultEpoch: new Date(about.faults.epochMs).toISOString(),
    rateHz: about.rateHz,
    samplesPerMessage: about.samplesPerMessage,
    units: units.length,
    unitsPublishing: units.filter((u) => u.device?.connected === true).length,
    unitsOffline: units.filter((u) => u.device?.connected !== true).map((u) => u.nameplate.id),
    messagesSent: counters.messagesSent,
    samplesSent: counters.samplesSent,
    samplesDropped: counters.samplesDropped,
    messagesFailed: counters.messagesFailed,
    lastPublishAt: counters.lastPublishMs === 0 ? null : new Date(counters.lastPublishMs).toISOString(),
  };
}
