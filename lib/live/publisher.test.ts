import { describe, expect, it } from 'vitest';
import type { DatabaseHandle } from '@/db/client';
import type { LiveEvent } from './events';
import { createLiveHub, type StampedEvent } from './hub';
import { createLivePublisher } from './publisher';

const samples = (unitId: string, lastTs: string): LiveEvent => ({ type: 'samples', siteId: 'tarn-edge', unitId, lastTs });

describe('live publisher', () => {
  it('sends nothing on the caller’s turn, then the newest event per unit once (in process)', async () => {
    const hub = createLiveHub();
    const got: StampedEvent[] = [];
    hub.subscribe((e) => got.push(e));
    const publisher = createLivePublisher({ handle: { backend: 'pglite' } as DatabaseHandle, hub });
    publisher.publish([samples('a', '2026-12-02T10:00:00.000Z'), samples('b', '2026-12-02T10:00:00.000Z')]);
    publisher.publish([samples('a', '2026-12-02T10:00:10.000Z')]);
    expect(got).toEqual([]);
    await publisher.flush();
    expect(got.map((e) => e.event)).toEqual([samples('a', '2026-12-02T10:00:10.000Z'), samples('b', '2026-12-02T10:00:00.000Z')]);
  });

  it('never throws when NOTIFY fails: counts what was lost and says so once', async () => {
    const lines: string[] = [];
    const log = { warn: (msg: string) => lines.push(msg), info: (msg: string) => lines.push(msg), debug() {}, error() {}, child: () => log };
    let calls = 0;
    const sql = { unsafe: async () => { calls++; throw new Error('connection refused'); } };
    const publisher = createLivePublisher({ handle: { backend: 'postgres', sql } as unknown as DatabaseHandle, log });
    publisher.publish([samples('a', '2026-12-02T10:00:00.000Z')]);
    await publisher.flush();
    publisher.publish([samples('b', '2026-12-02T10:00:00.000Z'), samples('c', '2026-12-02T10:00:00.000Z')]);
    await publisher.flush();
    expect(calls).toBe(2);
    expect(publisher.state()).toEqual({ mode: 'notify', sent: 0, failed: 3 });
    expect(lines).toEqual(['live feed: NOTIFY failed; open pages will not refresh until it works again']);
  });

  it('keeps one NOTIFY statement in flight, sending what came meanwhile after it', async () => {
    const statements: string[][] = [];
    let release: () => void = () => {};
    const sql = {
      unsafe: (_text: string, params: [string, string[]]) => {
        statements.push(params[1]);
        return new Promise<void>((resolve) => (release = resolve));
      },
    };
    const publisher = createLivePublisher({ handle: { backend: 'postgres', sql } as unknown as DatabaseHandle });
    publisher.publish([samples('a', '2026-12-02T10:00:00.000Z')]);
    await new Promise((r) => setImmediate(r));
    publisher.publish([samples('b', '2026-12-02T10:00:00.000Z')]);
    publisher.publish([samples('b', '2026-12-02T10:00:05.000Z')]);
    await new Promise((r) => setImmediate(r));
    expect(statements).toHaveLength(1);
    release();
    await new Promise((r) => setImmediate(r));
    expect(statements).toHaveLength(2);
    expect(JSON.parse(statements[1]![0]!)).toEqual([samples('b', '2026-12-02T10:00:05.000Z')]);
    release();
    await publisher.flush();
  });
});
