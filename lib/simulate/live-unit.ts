/**
 * One unit of the live demo fleet between start and stop, and what it does
 * in a run, each part on its own: take a sample, publish what it holds, drop
 * off the network (a simulated fault) and come back. The fleet
 * (simulator.ts) starts and stops the run and reports on it.
 */
import type { Logger } from '@/lib/log/logger';
import type { UnitDevice } from './device';
import type { SimulatedUnit } from './fleet-models';
import type { PublishedSample } from './machine';

/**
 * Messages a unit keeps while the broker does not acknowledge (a logger's
 * store-and-forward memory); beyond it the oldest new data is dropped and
 * counted.
 */
export const MAX_UNACKED_MESSAGES = 200;
/** Wait before a unit that could not reconnect tries again, ms. */
export const RECONNECT_RETRY_MS = 5000;

/** Where a run is. */
export type Lifecycle = 'running' | 'stopping' | 'stopped';

/** What a run needs of a unit's connection (a UnitDevice; tests give a stand-in). */
export type LiveDevice = Pick<UnitDevice, 'inFlight' | 'connected' | 'connect' | 'publishTelemetry' | 'dropUnclean' | 'close'>;

/** A unit in a live run. */
export interface LiveUnit extends SimulatedUnit {
  /** Undefined while the unit is off the network. */
  device: LiveDevice | undefined;
  /** Samples for the next message. */
  buffer: PublishedSample[];
  timer: NodeJS.Timeout | undefined;
  /** Time of the last sample, epoch ms. */
  lastMs: number;
  /** The unit has said it drops samples, and not since it stopped dropping. */
  dropWarned: boolean;
}

/** A run's counts. */
export interface LiveCounters {
  /** Messages and samples the broker acknowledged. */
  messagesSent: number;
  samplesSent: number;
  samplesDropped: number;
  messagesFailed: number;
  /** Epoch ms of the last acknowledgement; 0 before the first. */
  lastPublishMs: number;
}

/** What the units of one run share. */
export interface LiveRun {
  readonly log: Logger;
  readonly samplesPerMessage: number;
  readonly counters: LiveCounters;
  lifecycle: Lifecycle;
  /** Runs `fn` after `ms`, unless the run stops first. */
  readonly later: (ms: number, fn: () => void) => void;
  /** A new connection for `unit` (a comeback is a new device). */
  readonly newDevice: (unit: LiveUnit) => LiveDevice;
}

/** A unit of a run that has not connected yet. */
export function liveUnitOf(unit: SimulatedUnit): LiveUnit {
  return { ...unit, device: undefined, buffer: [], timer: undefined, lastMs: 0, dropWarned: false };
}

/** Zeroed counts. */
export function emptyCounters(): LiveCounters {
  return { messagesSent: 0, samplesSent: 0, samplesDropped: 0, messagesFailed: 0, lastPublishMs: 0 };
}

/**
 * Timeouts that `clear` cancels together (a run's stop), each forgotten
 * once it has fired.
 * @example const t = createTimeouts(); t.later(1000, () => log.info('late')); t.clear() // never logs
 */
export function createTimeouts(): { later(ms: number, fn: () => void): void; clear(): void; readonly size: number } {
  const pending = new Set<NodeJS.Timeout>();
  return {
    later(ms, fn) {
      const t = setTimeout(() => {
        pending.delete(t);
        fn();
      }, ms);
      pending.add(t);
    },
    clear() {
      for (const t of pending) clearTimeout(t);
      pending.clear();
    },
    get size() {
      return pending.size;
    },
  };
}

/**
 * Publishes what `unit` holds as one message, and empties its buffer. While
 * the broker leaves MAX_UNACKED_MESSAGES unacknowledged the samples are
 * dropped and counted instead (said once until it acknowledges again).
 */
export function publishHeld(run: LiveRun, unit: LiveUnit): void {
  const { counters, log } = run;
  const device = unit.device;
  const samples = unit.buffer;
  unit.buffer = [];
  if (device === undefined || samples.length === 0) return;
  if (device.inFlight >= MAX_UNACKED_MESSAGES) {
    counters.samplesDropped += samples.length;
    if (!unit.dropWarned) {
      unit.dropWarned = true;
      log.warn('broker not acknowledging: dropping new samples until it does', { unit: unit.nameplate.id, unacked: device.inFlight });
    }
    return;
  }
  unit.dropWarned = false;
  device.publishTelemetry(JSON.stringify(samples)).then(
    () => {
      counters.messagesSent++;
      counters.samplesSent += samples.length;
      counters.lastPublishMs = Date.now();
    },
    (error: unknown) => {
      counters.messagesFailed++;
      if (run.lifecycle === 'running' && unit.device === device) log.warn('publish failed', { unit: unit.nameplate.id, samples: samples.length, error });
    },
  );
}

/** Takes `unit`'s next sample now, and publishes once it holds a message's worth. */
export function takeSample(run: LiveRun, unit: LiveUnit): void {
  // Timestamps strictly rise even if the clock steps back.
  const t = Math.max(Date.now(), unit.lastMs + 1);
  unit.lastMs = t;
  const { sample } = unit.model.step(t);
  // A unit that is down logs nothing, but its machine keeps turning.
  if (unit.device === undefined) return;
  unit.buffer.push(sample);
  if (unit.buffer.length >= run.samplesPerMessage) publishHeld(run, unit);
}

/**
 * Drops `unit` off the network the way a failing device does (the broker
 * publishes its last will), losing what it held; it comes back after `forS`
 * seconds, or never if null.
 */
export function dropOffNetwork(run: LiveRun, unit: LiveUnit, forS: number | null): void {
  const device = unit.device;
  if (device === undefined) return;
  unit.device = undefined;
  unit.buffer = [];
  device.dropUnclean();
  run.log.info('unit dropped off the network (simulated fault)', { unit: unit.nameplate.id, backInS: forS });
  if (forS !== null) run.later(forS * 1000, () => comeBack(run, unit));
}

/** Reconnects `unit` with a new device while the run lasts, retrying every RECONNECT_RETRY_MS. */
export function comeBack(run: LiveRun, unit: LiveUnit): void {
  if (run.lifecycle !== 'running') return;
  const device = run.newDevice(unit);
  device.connect().then(
    () => {
      if (run.lifecycle !== 'running') return void device.close(0);
      unit.device = device;
      run.log.info('unit back online', { unit: unit.nameplate.id });
    },
    (error: unknown) => {
      run.log.warn('unit could not reconnect, retrying in 5 s', { unit: unit.nameplate.id, error });
      run.later(RECONNECT_RETRY_MS, () => comeBack(run, unit));
    },
  );
}
