/**
 * The ingester: MQTT telemetry and presence into PostgreSQL (or PGlite).
 * Connections → decode and validate at arrival → one batcher → samples,
 * rollups, quarantine and unit status in one transaction per batch → the
 * acknowledgements of that batch's messages. See lib/ingest/DESIGN.md.
 */
import { hostname } from 'node:os';
import type { DatabaseHandle } from '@/db/client';
import type { Logger } from '@/lib/log/logger';
import type { LivePublisher } from '@/lib/live/publisher';
import { pendingMessageOf } from './arrival';
import { createBatcher, type Batcher, type BatcherCounters, type PendingMessage } from './batcher';
import { openConnectionPool, type ConnectionPool, type Delivery } from './connections';
import { createTelemetryDecoder } from './decode';
import { RateWindow, reportIngesterState, sampleMemory, type IngesterState, type MemoryFigures } from './ingester-state';
import { runTelemetryMaintenance } from './maintenance';
import { openIngestDatabase } from './sql';
import { DEFAULT_SHARE_GROUP } from './topics';
import { createUnitDirectory } from './unit-directory';
import { startUpkeep, type Upkeep } from './upkeep';
import type { BatchResult } from './writer';

export type { IngesterState };

export interface IngesterOptions {
  handle: DatabaseHandle;
  brokerUrl: string;
  /** true: MQTT 5 shared subscription (Mosquitto 2 and the like); false: MQTT 3.1.1 plain subscription (the embedded broker). */
  mqtt5: boolean;
  /** Stable id of this ingester; its connections are `<clientId>-<i>`. Give each ingester its own; default `millrace-ingest-<host>`. */
  clientId?: string;
  /** Connections in the share group (MQTT 5). */
  connections: number;
  /** A batch closes at this many samples... */
  batchSamples: number;
  /** ...or this long after its first message, ms. */
  batchMs: number;
  /** Most samples held uncommitted; at the limit the ingester stops reading from the broker. */
  bufferSamples: number;
  log: Logger;
  username?: string;
  password?: string;
  /** Raw samples are kept this many days (RETENTION_DAYS); default 90. */
  retentionDays?: number;
  /** Share group of the subscription; default `millrace-ingest` (contract, section 3). */
  shareGroup?: string;
  /** Run retention and make partitions ahead at start and daily; default true. */
  maintenance?: boolean;
  /** How long the broker keeps this ingester's sessions while it is away, s; default 7 days. */
  sessionExpirySeconds?: number;
  /** Where to tell open pages that units have new samples: once per committed batch, one event a unit. */
  live?: LivePublisher;
}

export interface Ingester {
  /** Drains: commits what it holds, sends the acknowledgements, disconnects (sessions kept). */
  stop(): Promise<void>;
  /** Stops at once, as a crash would: nothing more is committed or acknowledged. */
  abort(): Promise<void>;
  /** Resolves once every connection has subscribed. */
  ready(): Promise<void>;
  state(): IngesterState;
}

/** The client id of an ingester that was given none: `millrace-ingest-<host>`. */
export function defaultIngestClientId(): string {
  return `millrace-ingest-${hostname().toLowerCase().replace(/[^a-z0-9._-]/g, '-').slice(0, 40)}`;
}

/**
 * Starts the ingester on an open database. Resolves once the database has
 * been read (units, retention); the connections keep trying the broker in the
 * background (see `ready`).
 */
export async function startIngester(options: IngesterOptions): Promise<Ingester> {
  const { handle, log } = options;
  const clientId = options.clientId ?? defaultIngestClientId();
  const retentionDays = options.retentionDays ?? 90;
  const startedAt = new Date();
  const database = await openIngestDatabase(handle);
  const directory = createUnitDirectory({ db: database.runner });
  const batcher = createBatcher({
    database,
    directory,
    log,
    batchSamples: options.batchSamples,
    batchMs: options.batchMs,
    bufferSamples: options.bufferSamples,
    onCommitted: liveFeedOf(options.live),
  });
  const decoder = createTelemetryDecoder({ retentionDays });
  const upkeep = await startUpkeep({
    run: () => runTelemetryMaintenance({ db: database.db(), retentionDays }),
    retentionDays,
    log,
    enabled: options.maintenance !== false,
  });
  const pool = connect(options, clientId, batcher, (delivery) => pendingMessageOf(delivery, directory, decoder));
  const meter = startMeter(() => batcher.state().counters);
  log.info('ingester started', {
    broker: options.brokerUrl,
    mqtt5: options.mqtt5,
    clientId,
    database: handle.location,
    batchSamples: options.batchSamples,
    batchMs: options.batchMs,
    bufferSamples: options.bufferSamples,
    retentionDays,
  });
  return running({ options, startedAt, close: () => database.close(), batcher, pool, upkeep, meter });
}

/** What tells open pages that units have new samples: one event a unit, once per committed batch. */
function liveFeedOf(live: LivePublisher | undefined): ((result: BatchResult) => void) | undefined {
  if (!live) return undefined;
  return (result) =>
    live.publish(result.sampledUnits.map((u) => ({ type: 'samples', siteId: u.siteId, unitId: u.unitId, lastTs: new Date(u.lastTsMs).toISOString() })));
}

/**
 * Opens the broker connections and subscribes; each delivery is made a
 * message by `arrive` and handed to the batcher, and a connection stops
 * reading while the buffer is full.
 */
function connect(options: IngesterOptions, clientId: string, batcher: Batcher, arrive: (delivery: Delivery) => PendingMessage): ConnectionPool {
  return openConnectionPool({
    brokerUrl: options.brokerUrl,
    mqtt5: options.mqtt5,
    clientId,
    connections: options.connections,
    shareGroup: options.shareGroup ?? DEFAULT_SHARE_GROUP,
    username: options.username,
    password: options.password,
    log: options.log,
    sessionExpirySeconds: options.sessionExpirySeconds,
    onDelivery: (delivery) => {
      batcher.add(arrive(delivery));
      if (!batcher.hasRoom()) return batcher.room();
    },
    onConnectionClosed: () => batcher.releaseDead(),
  });
}

type Meter = ReturnType<typeof startMeter>;

/** Each second: this process's memory (and its peaks) and the counters, for the rates. */
function startMeter(counters: () => Pick<BatcherCounters, 'samplesIn' | 'rowsCommitted'>) {
  const rates = new RateWindow();
  const memory: MemoryFigures = { rssMb: 0, heapUsedMb: 0, peakRssMb: 0, peakHeapUsedMb: 0, peakExternalMb: 0 };
  const sampler = setInterval(() => {
    sampleMemory(memory);
    rates.add(Date.now(), counters());
  }, 1000);
  sampler.unref();
  return { rates, memory, stop: () => clearInterval(sampler) };
}

/** The running ingester: its state, and the two ways to stop it (draining, or as a crash would). */
function running(parts: {
  options: IngesterOptions;
  startedAt: Date;
  close: () => Promise<void>;
  batcher: Batcher;
  pool: ConnectionPool;
  upkeep: Upkeep;
  meter: Meter;
}): Ingester {
  const { options, batcher, pool, upkeep, meter } = parts;
  const { log } = options;
  // A refused subscription is logged by the pool; keep the rejection from going unhandled.
  const ready = pool.ready();
  ready.catch(() => {});
  let stopped = false;
  const finish = async () => {
    stopped = true;
    upkeep.stop();
    meter.stop();
    await parts.close();
  };
  return {
    ready: () => ready,
    state: () => {
      const b = batcher.state();
      return reportIngesterState({
        stopped,
        startedAt: parts.startedAt,
        broker: { url: options.brokerUrl, mqtt5: options.mqtt5 },
        database: { location: options.handle.location, backend: options.handle.backend },
        batcher: b,
        connections: pool.states(),
        rates: meter.rates.rates(Date.now(), b.counters),
        memory: meter.memory,
        retention: upkeep.retention,
      });
    },
    async stop() {
      if (stopped) return;
      pool.pause();
      await batcher.stop({ drain: true });
      await pool.close();
      await finish();
      log.info('ingester stopped', { counters: batcher.state().counters, memory: meter.memory });
    },
    async abort() {
      if (stopped) return;
      pool.pause();
      await pool.close({ force: true });
      await batcher.stop({ drain: false });
      await finish();
      log.warn('ingester aborted; unacknowledged messages will be delivered again', {});
    },
  };
}
