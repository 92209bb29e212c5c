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
import type { Logger } from '@/lib/log/logger';
import { AppError } from '@/lib/errors/app-error';
import { demoFleet } from './demo-fleet';
import { UnitDevice, redactUrl, type CredentialsFor } from './device';
import { buildFleetModels, parseFleet, type FleetModelOptions } from './fleet-models';
import type { PublishedSample } from './machine';

/** Default pace of a history upload, samples per second (0 = as fast as acknowledgements allow). */
export const DEFAULT_BACKFILL_SAMPLES_PER_S = 10_000;
/** Largest payload sent, bytes: well under the ingester's 256 KiB limit. */
export const MAX_BACKFILL_PAYLOAD_BYTES = 192 * 1024;

export interface BackfillOptions extends FleetModelOptions {
  brokerUrl: string;
  log: Logger;
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
  username?: string | undefined;
  password?: string | undefined;
  /** Each unit's own credentials (a broker that checks who publishes where); else `username`/`password` for all. */
  credentialsFor?: CredentialsFor | undefined;
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

function checkRange(name: string, value: number, min: number, max: number, integer = false): number {
  if (!Number.isFinite(value) || value < min || value > max || (integer && !Number.isInteger(value))) {
    throw new AppError('bad-input', 'simulate', `${name} must be ${integer ? 'a whole number ' : ''}from ${min} to ${max}, got ${value}`);
  }
  return value;
}

/** JSON payloads of `samples`, split in halves until each fits MAX_BACKFILL_PAYLOAD_BYTES. */
export function payloadsOf(samples: readonly PublishedSample[]): { json: string; count: number }[] {
  const json = JSON.stringify(samples);
  if (Buffer.byteLength(json) <= MAX_BACKFILL_PAYLOAD_BYTES || samples.length === 1) return [{ json, count: samples.length }];
  const half = Math.ceil(samples.length / 2);
  return [...payloadsOf(samples.slice(0, half)), ...payloadsOf(samples.slice(half))];
}

/**
 * Writes the history over MQTT and resolves with its counts once the broker
 * has acknowledged every message.
 * @example await backfill({ brokerUrl: 'mqtt://127.0.0.1:1883', days: 3, log }) // { units: 14, samples: 362_870, ... }
 */
export async function backfill(options: BackfillOptions): Promise<BackfillResult> {
  const { brokerUrl, log } = options;
  const days = checkRange('days', options.days, 0, 3660);
  const intervalS = checkRange('intervalS', options.intervalS ?? 10, 0.1, 3600);
  const perMessage = checkRange('samplesPerMessage', options.samplesPerMessage ?? 360, 1, 100_000, true);
  const maxInFlight = checkRange('maxInFlight', options.maxInFlight ?? 4, 1, 1000, true);
  const pace = checkRange('maxSamplesPerS', options.maxSamplesPerS ?? DEFAULT_BACKFILL_SAMPLES_PER_S, 0, 10_000_000);
  const fleet = parseFleet(options.fleet ?? demoFleet);
  const endMs = options.endMs ?? Date.now();
  if (endMs > Date.now()) throw new AppError('bad-input', 'simulate', `endMs must not be in the future, got ${new Date(endMs).toISOString()}`);
  const { units } = buildFleetModels(fleet, options, Date.now());
  const count = Math.floor((days * 86_400) / intervalS);
  const stepMs = intervalS * 1000;
  const firstMs = endMs - (count - 1) * stepMs;
  const started = Date.now();
  const prefix = options.clientIdPrefix ?? 'millrace-sim';

  const devices = units.map(
    (u) =>
      new UnitDevice({
        brokerUrl,
        siteId: u.nameplate.siteId,
        unitId: u.nameplate.id,
        clientId: `${prefix}-${u.nameplate.id}-history`,
        username: options.credentialsFor?.(u.nameplate.siteId, u.nameplate.id)?.username ?? options.username,
        password: options.credentialsFor?.(u.nameplate.siteId, u.nameplate.id)?.password ?? options.password,
        log,
        presence: false,
      }),
  );
  const connected = await Promise.allSettled(devices.map((d) => d.connect()));
  const failure = connected.find((r): r is PromiseRejectedResult => r.status === 'rejected');
  if (failure !== undefined) {
    await Promise.all(devices.map((d) => d.close(0)));
    throw failure.reason;
  }
  log.info('writing demo history', { broker: redactUrl(brokerUrl), units: units.length, days, intervalS, samplesPerUnit: count });

  let messages = 0;
  let samples = 0;
  let samplesInGaps = 0;
  let inFlight = 0;
  let queuedSamples = 0;
  let firstError: unknown;
  let wake: (() => void) | undefined;
  const waitForSlot = () => new Promise<void>((resolve) => (wake = resolve));
  const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

  try {
    options.signal?.addEventListener('abort', () => {
      firstError ??= new Error('stopped on request');
      wake?.();
    });
    for (let k = 0; k < count && firstError === undefined; k += perMessage) {
      const upTo = Math.min(count, k + perMessage);
      for (let i = 0; i < units.length && firstError === undefined; i++) {
        const unit = units[i]!;
        const device = devices[i]!;
        const chunk: PublishedSample[] = [];
        for (let j = k; j < upTo; j++) {
          const { sample, truth } = unit.model.step(firstMs + j * stepMs);
          if (truth.effects.inHistoryGap) samplesInGaps++;
          else chunk.push(sample);
        }
        for (const payload of payloadsOf(chunk)) {
          if (payload.count === 0) continue;
          while (inFlight >= maxInFlight && firstError === undefined) await waitForSlot();
          if (firstError !== undefined) break;
          if (pace > 0) {
            // Hold the average pace: the upload may not run ahead of samples / pace.
            const aheadMs = ((queuedSamples + payload.count) / pace) * 1000 - (Date.now() - started);
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
              firstError ??= error;
              wake?.();
            },
          );
        }
      }
    }
    while (inFlight > 0) await waitForSlot();
  } finally {
    await Promise.all(devices.map((d) => d.close()));
  }
  if (firstError !== undefined) {
    throw new AppError('unavailable', 'simulate', `history upload to ${redactUrl(brokerUrl)} stopped after ${messages} messages (${samples} samples): ${(firstError as Error).message ?? String(firstError)}`, { cause: firstError, expose: true });
  }
  const elapsedMs = Date.now() - started;
  const result: BackfillResult = {
    units: units.length,
    messages,
    samples,
    samplesInGaps,
    from: new Date(count > 0 ? firstMs : endMs).toISOString(),
    to: new Date(endMs).toISOString(),
    elapsedMs,
    samplesPerS: elapsedMs > 0 ? Math.round((samples * 1000) / elapsedMs) : samples,
  };
  log.info('demo history written', { ...result });
  return result;
}
