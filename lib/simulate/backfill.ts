/**
 * History for the demo fleet: `days` of samples every `intervalS` seconds,
 * ending now, published over MQTT like loggers uploading their memory, with
 * the faults developing along it. Flow control: at most `maxInFlight`
 * messages wait for their PUBACK, and the pace is held at `maxSamplesPerS`,
 * because a broker acknowledges on receipt, not when the ingester has
 * committed: an unpaced upload could outrun the ingester and fill the
 * broker's queue for it (Mosquitto drops QoS 1 messages beyond
 * max_queued_messages, 1000 by default).
 */
import { AppError } from '@/lib/errors/app-error';
import { demoFleet } from './demo-fleet';
import { deviceForUnit, redactUrl, type BrokerAccess, type UnitDevice } from './device';
import { buildFleetModels, checkRange, parseFleet, type FleetModelOptions } from './fleet-models';
import type { PublishedSample, UnitModel } from './machine';

/** Default pace of a history upload, samples per second (0 = as fast as acknowledgements allow). */
export const DEFAULT_BACKFILL_SAMPLES_PER_S = 10_000;
/** Largest payload sent, bytes: well under the ingester's 256 KiB limit. */
export const MAX_BACKFILL_PAYLOAD_BYTES = 192 * 1024;

export interface BackfillOptions extends FleetModelOptions, BrokerAccess {
  /** Days of history, ending at `endMs`. */
  days: number;
  /** Seconds between samples; default 10. */
  intervalS?: number | undefined;
  /** Samples per message; default 360 (an hour at 10 s). */
  samplesPerMessage?: number | undefined;
  /** Messages awaiting PUBACK at once, over all units; default 4. */
  maxInFlight?: number | undefined;
  /** Pace, samples per second; default 10 000; 0 for no pacing. */
  maxSamplesPerS?: number | undefined;
  /** Last sample time, epoch ms; default now. */
  endMs?: number | undefined;
  /** Client ids are `<prefix>-<unitId>-history`; default `millrace-sim`. */
  clientIdPrefix?: string | undefined;
  /** Stops the upload early (what was acknowledged stays written). */
  signal?: AbortSignal | undefined;
}

export interface BackfillResult {
  units: number;
  messages: number;
  samples: number;
  /** Sample times that fell in a unit's simulated communications gap: nothing was logged. */
  samplesInGaps: number;
  from: string;
  to: string;
  elapsedMs: number;
  samplesPerS: number;
}

/** JSON payloads of `samples`, split in halves until each fits MAX_BACKFILL_PAYLOAD_BYTES. */
export function payloadsOf(samples: readonly PublishedSample[]): { json: string; count: number }[] {
  const json = JSON.stringify(samples);
  if (Buffer.byteLength(json) <= MAX_BACKFILL_PAYLOAD_BYTES || samples.length === 1) return [{ json, count: samples.length }];
  const half = Math.ceil(samples.length / 2);
  return [...payloadsOf(samples.slice(0, half)), ...payloadsOf(samples.slice(half))];
}

/** A history's checked options and its sample times: `count` times `stepMs` apart, from `firstMs` to `endMs`. */
export interface BackfillPlan {
  readonly days: number;
  readonly intervalS: number;
  readonly perMessage: number;
  readonly maxInFlight: number;
  /** Samples per second; 0 for no pacing. */
  readonly pace: number;
  readonly endMs: number;
  readonly count: number;
  readonly stepMs: number;
  readonly firstMs: number;
}

type PlanOptions = Pick<BackfillOptions, 'days' | 'intervalS' | 'samplesPerMessage' | 'maxInFlight' | 'maxSamplesPerS'>;

/**
 * The options of a history, checked, with their defaults.
 * @example backfillSettings({ days: 3 }) // { days: 3, intervalS: 10, perMessage: 360, maxInFlight: 4, pace: 10_000 }
 */
export function backfillSettings(options: PlanOptions): Omit<BackfillPlan, 'endMs' | 'count' | 'stepMs' | 'firstMs'> {
  return {
    days: checkRange('days', options.days, 0, 3660),
    intervalS: checkRange('intervalS', options.intervalS ?? 10, 0.1, 3600),
    perMessage: checkRange('samplesPerMessage', options.samplesPerMessage ?? 360, 1, 100_000, true),
    maxInFlight: checkRange('maxInFlight', options.maxInFlight ?? 4, 1, 1000, true),
    pace: checkRange('maxSamplesPerS', options.maxSamplesPerS ?? DEFAULT_BACKFILL_SAMPLES_PER_S, 0, 10_000_000),
  };
}

/**
 * The sample times of `days` of history every `intervalS`, ending at `endMs`
 * (default `nowMs`; never after it).
 * @example historyTimes({ days: 1, intervalS: 10 }, undefined, 1_772_323_200_000) // { endMs: 1_772_323_200_000, count: 8640, stepMs: 10_000, firstMs: 1_772_236_810_000 }
 */
export function historyTimes(
  { days, intervalS }: { readonly days: number; readonly intervalS: number },
  endMsOption: number | undefined,
  nowMs: number,
): Pick<BackfillPlan, 'endMs' | 'count' | 'stepMs' | 'firstMs'> {
  const endMs = endMsOption ?? nowMs;
  if (endMs > nowMs) throw new AppError('bad-input', 'simulate', `endMs must not be in the future, got ${new Date(endMs).toISOString()}`);
  const count = Math.floor((days * 86_400) / intervalS);
  const stepMs = intervalS * 1000;
  return { endMs, count, stepMs, firstMs: endMs - (count - 1) * stepMs };
}

/**
 * Writes the history over MQTT and resolves with its counts once the broker
 * has acknowledged every message.
 * @example await backfill({ brokerUrl: 'mqtt://127.0.0.1:1883', days: 3, log }) // { units: 14, samples: 362_870, ... }
 */
export async function backfill(options: BackfillOptions): Promise<BackfillResult> {
  const { brokerUrl, log } = options;
  const settings = backfillSettings(options);
  const fleet = parseFleet(options.fleet ?? demoFleet);
  const plan: BackfillPlan = { ...settings, ...historyTimes(settings, options.endMs, Date.now()) };
  const { units } = buildFleetModels(fleet, options, Date.now());
  const started = Date.now();
  const prefix = options.clientIdPrefix ?? 'millrace-sim';
  const devices = units.map((u) => deviceForUnit(options, u.nameplate, { clientId: `${prefix}-${u.nameplate.id}-history`, presence: false }));
  const connected = await Promise.allSettled(devices.map((d) => d.connect()));
  const failure = connected.find((r): r is PromiseRejectedResult => r.status === 'rejected');
  if (failure !== undefined) {
    await Promise.all(devices.map((d) => d.close(0)));
    throw failure.reason;
  }
  log.info('writing demo history', { broker: redactUrl(brokerUrl), units: units.length, days: plan.days, intervalS: plan.intervalS, samplesPerUnit: plan.count });

  const flow = createUploadFlow(plan, started);
  let samplesInGaps = 0;
  try {
    options.signal?.addEventListener('abort', () => flow.fail(new Error('stopped on request')));
    for (let k = 0; k < plan.count && flow.ok(); k += plan.perMessage) {
      const upTo = Math.min(plan.count, k + plan.perMessage);
      for (let i = 0; i < units.length && flow.ok(); i++) {
        const chunk = historyChunk(units[i]!.model, plan, k, upTo);
        samplesInGaps += chunk.inGaps;
        for (const payload of payloadsOf(chunk.samples)) {
          if (payload.count === 0) continue;
          if (!(await flow.send(devices[i]!, payload))) break;
        }
      }
    }
    await flow.drain();
  } finally {
    await Promise.all(devices.map((d) => d.close()));
  }
  const { messages, samples, firstError } = flow.counts();
  if (firstError !== undefined) {
    throw new AppError('unavailable', 'simulate', `history upload to ${redactUrl(brokerUrl)} stopped after ${messages} messages (${samples} samples): ${(firstError as Error).message ?? String(firstError)}`, { cause: firstError, expose: true });
  }
  const elapsedMs = Date.now() - started;
  const result: BackfillResult = {
    units: units.length,
    messages,
    samples,
    samplesInGaps,
    from: new Date(plan.count > 0 ? plan.firstMs : plan.endMs).toISOString(),
    to: new Date(plan.endMs).toISOString(),
    elapsedMs,
    samplesPerS: elapsedMs > 0 ? Math.round((samples * 1000) / elapsedMs) : samples,
  };
  log.info('demo history written', { ...result });
  return result;
}

/** The samples a unit logs at sample times `from` (inclusive) to `upTo`, and how many times fell in its simulated communications gap. */
export function historyChunk(
  model: Pick<UnitModel, 'step'>,
  plan: Pick<BackfillPlan, 'firstMs' | 'stepMs'>,
  from: number,
  upTo: number,
): { samples: PublishedSample[]; inGaps: number } {
  const samples: PublishedSample[] = [];
  let inGaps = 0;
  for (let j = from; j < upTo; j++) {
    const { sample, truth } = model.step(plan.firstMs + j * plan.stepMs);
    if (truth.effects.inHistoryGap) inGaps++;
    else samples.push(sample);
  }
  return { samples, inGaps };
}

/** What a history upload's flow control needs of a device. */
export type HistoryDevice = Pick<UnitDevice, 'publishTelemetry'>;

/**
 * Flow control of a history upload (see the module comment): at most
 * `maxInFlight` messages wait for their PUBACK, and the average pace since
 * `startedMs` stays at or under `pace` samples a second (0: unpaced). The
 * first failure, or `fail`, stops it: `send` then refuses and `drain`
 * waits only for what is already out.
 */
export function createUploadFlow(plan: Pick<BackfillPlan, 'maxInFlight' | 'pace'>, startedMs: number) {
  let messages = 0;
  let samples = 0;
  let inFlight = 0;
  let queuedSamples = 0;
  let firstError: unknown;
  let wake: (() => void) | undefined;
  const waitForSlot = () => new Promise<void>((resolve) => (wake = resolve));
  const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
  const fail = (error: unknown) => {
    firstError ??= error;
    wake?.();
  };
  return {
    /** No failure so far. */
    ok: () => firstError === undefined,
    fail,
    /** Publishes `payload` once a slot is free and the pace allows; false (nothing sent) once the upload has stopped. */
    async send(device: HistoryDevice, payload: { json: string; count: number }): Promise<boolean> {
      while (inFlight >= plan.maxInFlight && firstError === undefined) await waitForSlot();
      if (firstError !== undefined) return false;
      if (plan.pace > 0) {
        // Hold the average pace: the upload may not run ahead of samples / pace.
        const aheadMs = ((queuedSamples + payload.count) / plan.pace) * 1000 - (Date.now() - startedMs);
        if (aheadMs > 0) await sleep(aheadMs);
      }
      inFlight++;
      queuedSamples += payload.count;
      device.publishTelemetry(payload.json).then(
        () => {
          inFlight--;
          messages++;
          samples += payload.count;
          wake?.();
        },
        (error: unknown) => {
          inFlight--;
          fail(error);
        },
      );
      return true;
    },
    /** Resolves once every message sent is acknowledged or failed. */
    async drain(): Promise<void> {
      while (inFlight > 0) await waitForSlot();
    },
    /** Acknowledged messages and samples, and the first failure. */
    counts: () => ({ messages, samples, firstError }),
  };
}
