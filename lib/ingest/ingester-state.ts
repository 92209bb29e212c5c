/**
 * What the ingester reports about itself (`GET /api/health`): a status with
 * its reason, the broker and the database as it finds them, rates over the
 * last ten seconds, the buffer, memory and retention.
 */
import type { BatcherCounters, BatcherState } from './batcher';
import type { ConnectionState } from './connections';
import type { RetentionState } from './upkeep';

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
  memory: MemoryFigures;
  retention: RetentionState;
}

/** This process's memory now and at its peak, MB. */
export interface MemoryFigures {
  rssMb: number;
  heapUsedMb: number;
  peakRssMb: number;
  peakHeapUsedMb: number;
  peakExternalMb: number;
}

/** The rates are taken over this span, ms. */
export const RATE_WINDOW_MS = 10_000;

/** Counter readings of the last {@link RATE_WINDOW_MS} (and a second more), for the rates. */
export class RateWindow {
  private readonly history: Array<{ at: number; samples: number; rows: number }> = [];

  /** Records the counters as read at `atMs`, forgetting readings that have left the window. */
  add(atMs: number, counters: Pick<BatcherCounters, 'samplesIn' | 'rowsCommitted'>): void {
    const { history } = this;
    history.push({ at: atMs, samples: counters.samplesIn, rows: counters.rowsCommitted });
    while (history.length > 0 && history[0]!.at < atMs - RATE_WINDOW_MS - 1000) history.shift();
  }

  /** Samples in and rows committed per second since the oldest reading kept; 0 before any time has passed. */
  rates(nowMs: number, counters: Pick<BatcherCounters, 'samplesIn' | 'rowsCommitted'>): { samplesPerSecond: number; rowsPerSecond: number } {
    const first = this.history[0];
    const span = first ? (nowMs - first.at) / 1000 : 0;
    return {
      samplesPerSecond: span > 0 ? Math.round((counters.samplesIn - first!.samples) / span) : 0,
      rowsPerSecond: span > 0 ? Math.round((counters.rowsCommitted - first!.rows) / span) : 0,
    };
  }
}

/** Reads this process's memory into `memory`, keeping the peaks. */
export function sampleMemory(memory: MemoryFigures): void {
  const m = process.memoryUsage();
  memory.rssMb = Math.round(m.rss / 1048576);
  memory.heapUsedMb = Math.round(m.heapUsed / 1048576);
  memory.peakRssMb = Math.max(memory.peakRssMb, memory.rssMb);
  memory.peakHeapUsedMb = Math.max(memory.peakHeapUsedMb, memory.heapUsedMb);
  memory.peakExternalMb = Math.max(memory.peakExternalMb, Math.round((m.external + m.arrayBuffers) / 1048576));
}

/**
 * The ingester's status and why: down when stopped or without the broker;
 * degraded when the database is out of reach, some connections are down or
 * the buffer is 90 % full (in that order of precedence); else ok.
 */
export function ingesterStatus({
  stopped,
  connected,
  connections,
  databaseReachable,
  fillPct,
}: {
  stopped: boolean;
  /** Connections up, of `connections`. */
  connected: number;
  connections: number;
  databaseReachable: boolean;
  fillPct: number;
}): { status: IngesterState['status']; reason?: string } {
  if (stopped) return { status: 'down', reason: 'stopped' };
  if (connected === 0) return { status: 'down', reason: 'not connected to the broker' };
  if (!databaseReachable) return { status: 'degraded', reason: 'database unreachable: holding messages unacknowledged' };
  if (connected < connections) return { status: 'degraded', reason: `${connections - connected} of ${connections} broker connections down` };
  if (fillPct >= 90) return { status: 'degraded', reason: 'buffer nearly full: the database is not keeping up' };
  return { status: 'ok', reason: undefined };
}

/** What {@link reportIngesterState} reads. */
export interface IngesterReadings {
  stopped: boolean;
  startedAt: Date;
  broker: { url: string; mqtt5: boolean };
  database: { location: string; backend: string };
  batcher: BatcherState;
  connections: ConnectionState[];
  rates: { samplesPerSecond: number; rowsPerSecond: number };
  memory: MemoryFigures;
  retention: RetentionState;
}

/** The ingester's state from what its parts say now. */
export function reportIngesterState(r: IngesterReadings): IngesterState {
  const b = r.batcher;
  const connected = r.connections.filter((c) => c.connected).length;
  const fillPct = Math.round((b.bufferedSamples / b.bufferLimit) * 1000) / 10;
  const { status, reason } = ingesterStatus({
    stopped: r.stopped,
    connected,
    connections: r.connections.length,
    databaseReachable: b.database.reachable,
    fillPct,
  });
  return {
    status,
    reason,
    startedAt: r.startedAt.toISOString(),
    broker: { url: r.broker.url, mqtt5: r.broker.mqtt5, connected, connections: r.connections },
    database: {
      location: r.database.location,
      backend: r.database.backend,
      reachable: b.database.reachable,
      outageSince: b.database.outageSinceMs === undefined ? undefined : new Date(b.database.outageSinceMs).toISOString(),
      outages: b.database.outages,
      lastError: b.database.lastError,
    },
    counters: { ...b.counters, reconnects: r.connections.reduce((s, c) => s + c.reconnects, 0) },
    samplesPerSecond: r.rates.samplesPerSecond,
    rowsPerSecond: r.rates.rowsPerSecond,
    lagMs: b.lastBatch?.lagMs,
    commitDelayMs: b.lastBatch?.waitMs,
    lastBatch: b.lastBatch && { samples: b.lastBatch.samples, rows: b.lastBatch.rows, ms: b.lastBatch.ms, at: new Date(b.lastBatch.atMs).toISOString() },
    buffer: { samples: b.bufferedSamples, limit: b.bufferLimit, fillPct, committing: b.committingSamples, writing: b.committing },
    memory: { ...r.memory },
    retention: { ...r.retention },
  };
}
