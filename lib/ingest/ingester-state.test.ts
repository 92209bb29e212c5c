import { describe, expect, it } from 'vitest';
import type { BatcherState } from './batcher';
import { RATE_WINDOW_MS, RateWindow, ingesterStatus, reportIngesterState } from './ingester-state';

const healthy = { stopped: false, connected: 4, connections: 4, databaseReachable: true, fillPct: 10 };

describe('ingesterStatus', () => {
  it('is ok with every connection up, the database reachable and the buffer below 90 %', () => {
    expect(ingesterStatus(healthy)).toEqual({ status: 'ok', reason: undefined });
  });

  it('is down when stopped or without any broker connection', () => {
    expect(ingesterStatus({ ...healthy, stopped: true })).toEqual({ status: 'down', reason: 'stopped' });
    expect(ingesterStatus({ ...healthy, connected: 0 })).toEqual({ status: 'down', reason: 'not connected to the broker' });
  });

  it('is degraded when the database is out of reach, some connections are down, or the buffer is 90 % full', () => {
    expect(ingesterStatus({ ...healthy, databaseReachable: false }).reason).toBe('database unreachable: holding messages unacknowledged');
    expect(ingesterStatus({ ...healthy, connected: 3 }).reason).toBe('1 of 4 broker connections down');
    expect(ingesterStatus({ ...healthy, fillPct: 90 }).reason).toBe('buffer nearly full: the database is not keeping up');
    expect(ingesterStatus({ ...healthy, fillPct: 89.9 }).status).toBe('ok');
  });

  it('names the first cause in that order: stopped, broker, database, connections, buffer', () => {
    const everything = { stopped: false, connected: 0, connections: 4, databaseReachable: false, fillPct: 100 };
    expect(ingesterStatus(everything).reason).toBe('not connected to the broker');
    expect(ingesterStatus({ ...everything, connected: 2 }).reason).toBe('database unreachable: holding messages unacknowledged');
    expect(ingesterStatus({ ...everything, connected: 2, databaseReachable: true }).reason).toBe('2 of 4 broker connections down');
  });
});

describe('RateWindow', () => {
  it('is 0 before any time has passed since its oldest reading', () => {
    const rates = new RateWindow();
    expect(rates.rates(1000, { samplesIn: 50, rowsCommitted: 50 })).toEqual({ samplesPerSecond: 0, rowsPerSecond: 0 });
    rates.add(1000, { samplesIn: 0, rowsCommitted: 0 });
    expect(rates.rates(1000, { samplesIn: 50, rowsCommitted: 50 })).toEqual({ samplesPerSecond: 0, rowsPerSecond: 0 });
  });

  it('divides what came in since the oldest reading by the seconds since it', () => {
    const rates = new RateWindow();
    rates.add(0, { samplesIn: 100, rowsCommitted: 90 });
    rates.add(1000, { samplesIn: 400, rowsCommitted: 300 });
    expect(rates.rates(4000, { samplesIn: 1300, rowsCommitted: 1290 })).toEqual({ samplesPerSecond: 300, rowsPerSecond: 300 });
  });

  it('forgets readings older than the window and a second', () => {
    const rates = new RateWindow();
    rates.add(0, { samplesIn: 0, rowsCommitted: 0 });
    rates.add(1000, { samplesIn: 1000, rowsCommitted: 1000 });
    rates.add(RATE_WINDOW_MS + 1001, { samplesIn: 5000, rowsCommitted: 5000 });
    // The reading at 0 has gone, the one at 1000 is the oldest kept.
    expect(rates.rates(RATE_WINDOW_MS + 2000, { samplesIn: 12_000, rowsCommitted: 12_000 })).toEqual({ samplesPerSecond: 1000, rowsPerSecond: 1000 });
  });
});

describe('reportIngesterState', () => {
  const batcher: BatcherState = {
    counters: {
      messages: 3,
      samplesIn: 30,
      rowsCommitted: 20,
      duplicates: 0,
      quarantined: 0,
      presenceUpdates: 0,
      batches: 1,
      failedCommits: 0,
      releasedForRedelivery: 0,
      unknownFieldMessages: 0,
    },
    bufferedSamples: 1234,
    bufferLimit: 10_000,
    committing: true,
    committingSamples: 1000,
    database: { reachable: true, outages: 0 },
    lastBatch: { samples: 20, rows: 20, ms: 12, lagMs: 800, waitMs: 210, atMs: Date.UTC(2026, 0, 1) },
  };
  const readings = {
    stopped: false,
    startedAt: new Date(Date.UTC(2026, 0, 1)),
    broker: { url: 'mqtt://127.0.0.1:1883', mqtt5: true },
    database: { location: '127.0.0.1:5432/millrace', backend: 'postgres' },
    batcher,
    connections: [
      { clientId: 'i-0', connected: true, subscribed: true, reconnects: 2, paused: false },
      { clientId: 'i-1', connected: false, subscribed: false, reconnects: 1, paused: false },
    ],
    rates: { samplesPerSecond: 5, rowsPerSecond: 4 },
    memory: { rssMb: 90, heapUsedMb: 20, peakRssMb: 100, peakHeapUsedMb: 30, peakExternalMb: 5 },
    retention: { days: 90, droppedPartitions: 0, quarantineRowsDeleted: 0 },
  };

  it('gives the buffer fill to a tenth of a percent, and the reconnects of every connection summed', () => {
    const state = reportIngesterState(readings);
    expect(state.buffer).toEqual({ samples: 1234, limit: 10_000, fillPct: 12.3, committing: 1000, writing: true });
    expect(state.counters.reconnects).toBe(3);
    expect(state.broker.connected).toBe(1);
    expect(state).toMatchObject({ status: 'degraded', reason: '1 of 2 broker connections down' });
  });

  it('gives times as ISO text and the last batch as its wait (commitDelayMs) and lag', () => {
    const state = reportIngesterState(readings);
    expect(state.startedAt).toBe('2026-01-01T00:00:00.000Z');
    expect(state.lastBatch).toEqual({ samples: 20, rows: 20, ms: 12, at: '2026-01-01T00:00:00.000Z' });
    expect(state).toMatchObject({ lagMs: 800, commitDelayMs: 210, samplesPerSecond: 5, rowsPerSecond: 4 });
    const outage = reportIngesterState({ ...readings, batcher: { ...batcher, database: { reachable: false, outageSinceMs: Date.UTC(2026, 0, 2), outages: 1 } } });
    expect(outage.database.outageSince).toBe('2026-01-02T00:00:00.000Z');
  });
});
