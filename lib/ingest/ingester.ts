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
import { createBatcher, type BatcherCounters, type PendingMessage } from './batcher';
import { openConnectionPool, type ConnectionState, type Delivery } from './connections';
import { NO_ENTRIES, NO_FIELDS, QUARANTINE_PAYLOAD_CHARS, boundText, createTelemetryDecoder, decodePresencePayload } from './decode';
import { EMPTY_BLOCK } from './sample-block';
import { runTelemetryMaintenance } from './maintenance';
import { openIngestDatabase } from './sql';
import { DEFAULT_SHARE_GROUP, parseUnitTopic } from './topics';
import { createUnitDirectory } from './unit-directory';

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

export interface IngesterState {
  status: 'ok' | 'degraded' | 'down';
  [key: string]: unknown;
  reason?: string;
  startedAt: string;
  broker: { url: string; mqtt5: boolean; connected: number; connections: ConnectionState[] };
  database: { location: string; backend: string; reachable: boolean; outageSince?: string; outages: number; lastError?: string };
  counters: BatcherCounters & { reconnects: number };
  samplesPerSecond: number;
  rowsPerSecond: number;
  /** Commit time minus the newest sample time, of the last batch that stored samples, ms. */
  lagMs?: number;
  /** Commit time minus the receipt of the oldest message of the last batch, ms. */
  commitDelayMs?: number;
  lastBatch?: { samples: number; rows: number; ms: number; at: string };
  /** Samples held uncommitted, of which `committing` are in a batch being written. */
  buffer: { samples: number; limit: number; fillPct: number; committing: number; writing: boolean };
  /** This process's memory now and at its peak (sampled each second), MB. */
  memory: { rssMb: number; heapUsedMb: number; peakRssMb: number; peakHeapUsedMb: number; peakExternalMb: number };
  retention: { days: number; lastRunAt?: string; droppedPartitions: number; quarantineRowsDeleted: number; lastError?: string };
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

const DAY_MS = 86_400_000;

/** The client id of an ingester that was given none: `millrace-ingest-<host>`. */
export function defaultIngestClientId(): string {
  return `millrace-ingest-${hostname().toLowerCase().replace(/[^a-z0-9._-]/g, '-').slice(0, 40)}`;
}
const RATE_WINDOW_MS = 10_000;

/**
 * Starts the ingester on an open database. Resolves once the database has
 * been read (units, retention); the connections keep trying the broker in the
 * background (see `ready`).
 */
export async function startIngester(options: IngesterOptions): Promise<Ingester> {
  const { handle, log, live } = options;
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
    onCommitted: live
      ? (result) =>
          live.publish(result.sampledUnits.map((u) => ({ type: 'samples', siteId: u.siteId, unitId: u.unitId, lastTs: new Date(u.lastTsMs).toISOString() })))
      : undefined,
  });
  const decoder = createTelemetryDecoder({ retentionDays });
  const retention: IngesterState['retention'] = { days: retentionDays, droppedPartitions: 0, quarantineRowsDeleted: 0 };
  let stopped = false;
  const timers: NodeJS.Timeout[] = [];

  const maintain = async () => {
    try {
      const result = await runTelemetryMaintenance({ db: database.db(), retentionDays });
      retention.lastRunAt = new Date().toISOString();
      retention.droppedPartitions += result.dropped.length;
      retention.quarantineRowsDeleted += result.quarantineDeleted;
      retention.lastError = undefined;
      if (result.dropped.length > 0) {
        log.info('raw samples past retention dropped', { partitions: result.dropped, retentionDays });
      }
      if (result.quarantineDeleted > 0) {
        log.info('telemetry set aside past retention deleted', { rows: result.quarantineDeleted, retentionDays });
      }
      return true;
    } catch (error) {
      retention.lastError = error instanceof Error ? error.message : String(error);
      log.error('retention and partition upkeep failed; trying again in a minute', { error });
      return false;
    }
  };
  if (options.maintenance !== false) {
    const ok = await maintain();
    const daily = setInterval(() => void maintain(), DAY_MS);
    daily.unref();
    timers.push(daily);
    if (!ok) {
      const retry = setInterval(async () => {
        if (await maintain()) clearInterval(retry);
      }, 60_000);
      retry.unref();
      timers.push(retry);
    }
  }

  const take = (delivery: Delivery): void | Promise<void> => {
    const topic = parseUnitTopic(delivery.topic);
    // The text is kept only where a whole-message quarantine row may need it: not for a unit known here.
    const known = topic.ok && directory.knows(topic.siteId, topic.unitId);
    // One object literal per message, no spreads: this runs for every message (see DESIGN.md, "Speed").
    const message: PendingMessage = {
      topic: delivery.topic,
      siteId: topic.siteId,
      unitId: topic.unitId,
      kind: 'bad-topic',
      receivedAtMs: delivery.receivedAtMs,
      retained: delivery.retain,
      samples: EMPTY_BLOCK,
      quarantined: NO_ENTRIES,
      presence: undefined,
      unknownFields: NO_FIELDS,
      preview: known
        ? ''
        : boundText(delivery.payload.subarray(0, QUARANTINE_PAYLOAD_CHARS).toString('utf8'), QUARANTINE_PAYLOAD_CHARS, delivery.payload.byteLength),
      payloadBytes: delivery.payload.byteLength,
      topicProblem: undefined,
      qos: delivery.qos,
      receipt: delivery.receipt,
    };
    if (!topic.ok) {
      message.topicProblem = topic.reason;
    } else if (topic.kind === 'presence') {
      message.kind = 'presence';
      const presence = decodePresencePayload(delivery.payload);
      if (presence.ok) message.presence = presence.presence;
      else {
        message.presence = null;
        message.quarantined = [presence.entry];
      }
    } else {
      message.kind = 'telemetry';
      const decoded = decoder.decode(delivery.payload, delivery.receivedAtMs);
      message.samples = decoded.samples;
      message.quarantined = decoded.quarantined;
      message.unknownFields = decoded.unknownFields;
    }
    batcher.add(message);
    if (!batcher.hasRoom()) return batcher.room();
  };

  const pool = openConnectionPool({
    brokerUrl: options.brokerUrl,
    mqtt5: options.mqtt5,
    clientId,
    connections: options.connections,
    shareGroup: options.shareGroup ?? DEFAULT_SHARE_GROUP,
    username: options.username,
    password: options.password,
    log,
    sessionExpirySeconds: options.sessionExpirySeconds,
    onDelivery: take,
    onConnectionClosed: () => batcher.releaseDead(),
  });
  // A refused subscription is logged by the pool; keep the rejection from going unhandled.
  const ready = pool.ready();
  ready.catch(() => {});

  const history: Array<{ at: number; samples: number; rows: number }> = [];
  const memory = { rssMb: 0, heapUsedMb: 0, peakRssMb: 0, peakHeapUsedMb: 0, peakExternalMb: 0 };
  const sampleMemory = () => {
    const m = process.memoryUsage();
    memory.rssMb = Math.round(m.rss / 1048576);
    memory.heapUsedMb = Math.round(m.heapUsed / 1048576);
    memory.peakRssMb = Math.max(memory.peakRssMb, memory.rssMb);
    memory.peakHeapUsedMb = Math.max(memory.peakHeapUsedMb, memory.heapUsedMb);
    memory.peakExternalMb = Math.max(memory.peakExternalMb, Math.round((m.external + m.arrayBuffers) / 1048576));
  };
  const sampler = setInterval(() => {
    sampleMemory();
    const c = batcher.state().counters;
    history.push({ at: Date.now(), samples: c.samplesIn, rows: c.rowsCommitted });
    while (history.length > 0 && history[0]!.at < Date.now() - RATE_WINDOW_MS - 1000) history.shift();
  }, 1000);
  sampler.unref();
  timers.push(sampler);

  const state = (): IngesterState => {
    const b = batcher.state();
    const connections = pool.states();
    const connected = connections.filter((c) => c.connected).length;
    const first = history[0];
    const nowMs = Date.now();
    const span = first ? (nowMs - first.at) / 1000 : 0;
    const fillPct = Math.round((b.bufferedSamples / b.bufferLimit) * 1000) / 10;
    let status: IngesterState['status'] = 'ok';
    let reason: string | undefined;
    if (stopped) [status, reason] = ['down', 'stopped'];
    else if (connected === 0) [status, reason] = ['down', 'not connected to the broker'];
    else if (!b.database.reachable) [status, reason] = ['degraded', 'database unreachable: holding messages unacknowledged'];
    else if (connected < connections.length) [status, reason] = ['degraded', `${connections.length - connected} of ${connections.length} broker connections down`];
    else if (fillPct >= 90) [status, reason] = ['degraded', 'buffer nearly full: the database is not keeping up'];
    return {
      status,
      reason,
      startedAt: startedAt.toISOString(),
      broker: { url: options.brokerUrl, mqtt5: options.mqtt5, connected, connections },
      database: {
        location: handle.location,
        backend: handle.backend,
        reachable: b.database.reachable,
        outageSince: b.database.outageSinceMs === undefined ? undefined : new Date(b.database.outageSinceMs).toISOString(),
        outages: b.database.outages,
        lastError: b.database.lastError,
      },
      counters: { ...b.counters, reconnects: connections.reduce((s, c) => s + c.reconnects, 0) },
      samplesPerSecond: span > 0 ? Math.round((b.counters.samplesIn - first!.samples) / span) : 0,
      rowsPerSecond: span > 0 ? Math.round((b.counters.rowsCommitted - first!.rows) / span) : 0,
      lagMs: b.lastBatch?.lagMs,
      commitDelayMs: b.lastBatch?.waitMs,
      lastBatch: b.lastBatch && { samples: b.lastBatch.samples, rows: b.lastBatch.rows, ms: b.lastBatch.ms, at: new Date(b.lastBatch.atMs).toISOString() },
      buffer: { samples: b.bufferedSamples, limit: b.bufferLimit, fillPct, committing: b.committingSamples, writing: b.committing },
      memory: { ...memory },
      retention: { ...retention },
    };
  };

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

  const finish = async () => {
    stopped = true;
    for (const t of timers) clearInterval(t);
    await database.close();
  };

  return {
    ready: () => ready,
    state,
    async stop() {
      if (stopped) return;
      pool.pause();
      await batcher.stop({ drain: true });
      await pool.close();
      await finish();
      log.info('ingester stopped', { counters: batcher.state().counters, memory });
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
