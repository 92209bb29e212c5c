import { describe, expect, it } from 'vitest';
import { createLogger } from '@/lib/log/logger';
import { OutageTracker } from './outage';

function tracker() {
  const lines: string[] = [];
  let nowMs = 1_000_000;
  const outage = new OutageTracker({
    log: createLogger('ingest', 'debug', (line) => lines.push(line)),
    location: '127.0.0.1:5432/millrace',
    now: () => nowMs,
    held: () => 1234,
  });
  const logged = () => lines.map((l) => JSON.parse(l) as { level: string; msg: string; [k: string]: unknown });
  return { outage, logged, advance: (ms: number) => (nowMs += ms) };
}

describe('OutageTracker', () => {
  it('starts reachable, with no outage', () => {
    expect(tracker().outage.snapshot()).toEqual({ reachable: true, outages: 0 });
  });

  it('logs an outage once when it starts, however many retries fail in it', () => {
    const { outage, logged, advance } = tracker();
    outage.failed(new Error('connect ECONNREFUSED'));
    advance(250);
    outage.failed(new Error('connect ETIMEDOUT'));
    outage.failed(new Error('connect ETIMEDOUT'));
    const errors = logged().filter((l) => l.level === 'error');
    expect(errors).toHaveLength(1);
    expect(errors[0]).toMatchObject({ msg: 'database unreachable: holding messages unacknowledged and retrying', bufferedSamples: 1234 });
    // The outage started at the first failure; lastError is the latest.
    expect(outage.snapshot()).toEqual({ reachable: false, outageSinceMs: 1_000_000, outages: 1, lastError: 'connect ETIMEDOUT' });
  });

  it('logs the end of an outage once, with how long it lasted', () => {
    const { outage, logged, advance } = tracker();
    outage.failed(new Error('down'));
    advance(4000);
    outage.succeeded();
    outage.succeeded();
    const infos = logged().filter((l) => l.level === 'info');
    expect(infos).toHaveLength(1);
    expect(infos[0]).toMatchObject({ msg: 'database reachable again', outageMs: 4000, bufferedSamples: 1234 });
  });

  it('says nothing when commits succeed without an outage', () => {
    const { outage, logged } = tracker();
    outage.succeeded();
    expect(logged()).toEqual([]);
  });

  it('counts each outage, and keeps the last error after the database is back', () => {
    const { outage } = tracker();
    outage.failed('first');
    outage.succeeded();
    outage.failed(new Error('second'));
    outage.succeeded();
    expect(outage.snapshot()).toMatchObject({ reachable: true, outageSinceMs: undefined, outages: 2, lastError: 'second' });
  });

  it('gives a copy: the state it hands out does not change under the caller', () => {
    const { outage } = tracker();
    const before = outage.snapshot();
    outage.failed(new Error('down'));
    expect(before.reachable).toBe(true);
  });
});
