import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createLogger } from '@/lib/log/logger';
import type { MaintenanceResult } from './maintenance';
import { startUpkeep } from './upkeep';

const log = createLogger('ingest', 'silent');
const done = (dropped: string[] = [], quarantineDeleted = 0): MaintenanceResult => ({ dropped, created: [], quarantineDeleted, cutoffMs: 0 });

describe('startUpkeep', () => {
  beforeEach(() => {
    vi.useFakeTimers();
  });
  afterEach(() => {
    vi.useRealTimers();
  });

  it('does nothing when turned off', async () => {
    const run = vi.fn(async () => done());
    const upkeep = await startUpkeep({ run, retentionDays: 90, log, enabled: false });
    await vi.advanceTimersByTimeAsync(2 * 86_400_000);
    expect(run).not.toHaveBeenCalled();
    expect(upkeep.retention).toEqual({ days: 90, droppedPartitions: 0, quarantineRowsDeleted: 0 });
  });

  it('runs at start and then once a day, adding up what it dropped and deleted', async () => {
    const run = vi.fn(async () => done(['telemetry_samples_2025_09'], 12));
    const upkeep = await startUpkeep({ run, retentionDays: 90, log, enabled: true });
    expect(run).toHaveBeenCalledTimes(1);
    await vi.advanceTimersByTimeAsync(86_400_000);
    expect(run).toHaveBeenCalledTimes(2);
    expect(upkeep.retention).toMatchObject({ droppedPartitions: 2, quarantineRowsDeleted: 24, lastError: undefined });
    upkeep.stop();
    await vi.advanceTimersByTimeAsync(86_400_000);
    expect(run).toHaveBeenCalledTimes(2);
  });

  it('after a failed first run, tries again every minute until one succeeds, then only daily', async () => {
    let failures = 2;
    const run = vi.fn(async () => {
      if (failures-- > 0) throw new Error('relation "telemetry_samples" does not exist');
      return done();
    });
    const upkeep = await startUpkeep({ run, retentionDays: 90, log, enabled: true });
    expect(upkeep.retention.lastError).toBe('relation "telemetry_samples" does not exist');
    await vi.advanceTimersByTimeAsync(60_000);
    expect(run).toHaveBeenCalledTimes(2);
    await vi.advanceTimersByTimeAsync(60_000);
    expect(run).toHaveBeenCalledTimes(3);
    expect(upkeep.retention.lastError).toBeUndefined();
    await vi.advanceTimersByTimeAsync(10 * 60_000);
    expect(run).toHaveBeenCalledTimes(3);
    upkeep.stop();
  });
});
