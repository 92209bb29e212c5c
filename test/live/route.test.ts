/**
 * GET /api/live, called as Next calls it (a Request in, a streamed Response
 * out): the query is checked, a site or unit the viewer cannot see is a 404,
 * each event carries an id, a reconnect resumes after Last-Event-ID or is
 * told to reset, a heartbeat comment goes out every 15 s, everything is let
 * go when the client leaves, and a process keeps at most LIVE_MAX_STREAMS
 * streams open. The SSE rules are those of the WHATWG HTML standard,
 * "Server-sent events" (event, id, retry fields; comment lines start with a colon).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { LOCAL_VIEWER, type Viewer } from '@/lib/auth/viewer';
import { closeDatabase, getDatabase } from '@/db/client';
import { upsertFleet } from '@/lib/setup/queries';
import { getLiveHub } from '@/lib/live/hub';
import type { LiveEvent } from '@/lib/live/events';
import { testFleet, testTag } from '@/test/support/ingest';

// The viewer of each request, as lib/auth/viewer.ts would read it from the session.
let asViewer: Viewer = LOCAL_VIEWER;
vi.mock('@/lib/auth/viewer', async (original) => ({
  ...(await original<typeof import('@/lib/auth/viewer')>()),
  currentViewer: async () => asViewer,
}));

const LIMIT = 3;
process.env.LIVE_MAX_STREAMS = String(LIMIT);
const { GET } = await import('@/app/api/live/route');

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 2, hydroUnits: 1 });
const [w1, w2, h1] = fleet.units as [(typeof fleet.units)[0], (typeof fleet.units)[0], (typeof fleet.units)[0]];
const hub = getLiveHub();

interface Open {
  response: Response;
  abort(): void;
  /** Reads until the text so far matches `pattern`; returns everything read so far. */
  readUntil(pattern: RegExp, timeoutMs?: number): Promise<string>;
  text(): string;
  /** Resolves true when the body has ended (within a second). */
  ended(): Promise<boolean>;
}

async function open(query: string, headers: Record<string, string> = {}): Promise<Open> {
  const controller = new AbortController();
  const response = await GET(new Request(`http://localhost/api/live?${query}`, { headers, signal: controller.signal }));
  const reader = response.body?.getReader();
  const decoder = new TextDecoder();
  let text = '';
  return {
    response,
    abort: () => controller.abort(),
    text: () => text,
    async ended() {
      for (;;) {
        const next = await Promise.race([reader!.read(), new Promise<'late'>((r) => setTimeout(() => r('late'), 1000))]);
        if (next === 'late') return false;
        if (next.done) return true;
      }
    },
    async readUntil(pattern, timeoutMs = 2000) {
      const deadline = Date.now() + timeoutMs;
      while (!pattern.test(text)) {
        if (Date.now() > deadline) throw new Error(`stream never matched ${pattern}; got:\n${text}`);
        const next = await Promise.race([reader!.read(), new Promise<'late'>((r) => setTimeout(() => r('late'), 50))]);
        if (next === 'late') continue;
        if (next.done) throw new Error(`stream ended before ${pattern}; got:\n${text}`);
        text += decoder.decode(next.value);
      }
      return text;
    },
  };
}

const samples = (unit: { siteId: string; id: string }, ts = new Date().toISOString()): LiveEvent => ({ type: 'samples', siteId: unit.siteId, unitId: unit.id, lastTs: ts });

/** The events of a stream's text: name, id and parsed data. */
function eventsOf(text: string) {
  return text
    .split('\n\n')
    .filter((block) => block.includes('event: '))
    .map((block) => {
      const field = (name: string) => block.split('\n').find((l) => l.startsWith(`${name}: `))?.slice(name.length + 2);
      return { event: field('event')!, id: field('id')!, data: JSON.parse(field('data') ?? 'null') as Record<string, unknown> };
    });
}

beforeAll(async () => {
  const handle = await getDatabase({ dataDir: 'memory://' });
  await upsertFleet({ db: handle.db, fleet });
});

afterAll(async () => {
  await closeDatabase();
});

describe('GET /api/live: the query', () => {
  it('answers 400 naming the parameter when site is missing or malformed', async () => {
    const missing = await GET(new Request('http://localhost/api/live'));
    expect(missing.status).toBe(400);
    const body = (await missing.json()) as { error: { code: string; message: string } };
    expect(body.error.code).toBe('bad-input:live');
    expect(body.error.message).toMatch(/^site: required/);
    const badUnit = await GET(new Request(`http://localhost/api/live?site=${w1.siteId}&unit=Not%20A%20Slug`));
    expect(badUnit.status).toBe(400);
    expect(((await badUnit.json()) as { error: { message: string } }).error.message).toMatch(/^unit: must be 1 to 64 of a-z/);
  });

  it('answers 404 for a site that does not exist and a unit of another site, alike', async () => {
    const noSite = await GET(new Request('http://localhost/api/live?site=no-such-site'));
    expect(noSite.status).toBe(404);
    const elsewhere = await GET(new Request(`http://localhost/api/live?site=${w1.siteId}&unit=${h1.id}`));
    expect(elsewhere.status).toBe(404);
    expect(((await elsewhere.json()) as { error: { code: string } }).error.code).toBe('not-found:live');
    expect(hub.openStreams()).toBe(0);
  });

  it('answers 404 for a site the viewer may not see, as for one that does not exist', async () => {
    asViewer = { id: 'crew-1', role: 'crew', siteIds: [h1.siteId] };
    try {
      expect((await GET(new Request(`http://localhost/api/live?site=${w1.siteId}`))).status).toBe(404);
      expect((await GET(new Request(`http://localhost/api/live?site=${w1.siteId}&unit=${w1.id}`))).status).toBe(404);
      const own = await GET(new Request(`http://localhost/api/live?site=${h1.siteId}`));
      expect(own.status).toBe(200);
      await own.body?.cancel();
      expect(hub.openStreams()).toBe(0);
    } finally {
      asViewer = LOCAL_VIEWER;
    }
  });
});

describe('GET /api/live: the stream', () => {
  it('sends the headers an event stream needs, a ready event with an id, then the page events of its unit only, each with a rising id', async () => {
    const s = await open(`site=${w1.siteId}&unit=${w1.id}`);
    expect(s.response.status).toBe(200);
    expect(s.response.headers.get('content-type')).toMatch(/^text\/event-stream/);
    expect(s.response.headers.get('cache-control')).toBe('no-cache, no-transform');
    expect(s.response.headers.get('x-accel-buffering')).toBe('no');
    await s.readUntil(/event: ready\n/);
    expect(s.text()).toMatch(/^retry: \d+\n/);
    hub.publish([
      samples(w2),
      samples(h1),
      { type: 'device-credentials', siteId: w1.siteId, unitId: w1.id },
      samples(w1),
      { type: 'diagnosis', siteId: w1.siteId, unitId: w1.id, verdict: 'shorted-turns', previousVerdict: 'healthy' },
    ]);
    await s.readUntil(/event: diagnosis\n/);
    const events = eventsOf(s.text()).filter((e) => e.event !== 'ready');
    expect(events.map((e) => [e.event, e.data.unitId])).toEqual([
      ['samples', w1.id],
      ['diagnosis', w1.id],
    ]);
    expect(events[1]!.data).toEqual({ type: 'diagnosis', siteId: w1.siteId, unitId: w1.id, verdict: 'shorted-turns', previousVerdict: 'healthy' });
    const seqs = events.map((e) => Number(e.id.split('-')[1]));
    expect(seqs[1]).toBeGreaterThan(seqs[0]!);
    s.abort();
  });

  it('a site stream carries every unit of that site and none of another', async () => {
    const s = await open(`site=${w1.siteId}`);
    await s.readUntil(/event: ready\n/);
    hub.publish([samples(h1), samples(w2), samples(w1)]);
    await s.readUntil(new RegExp(`"unitId":"${w1.id}"`));
    expect(eventsOf(s.text()).filter((e) => e.event === 'samples').map((e) => e.data.unitId)).toEqual([w2.id, w1.id]);
    s.abort();
  });

  it('resumes after Last-Event-ID with the events missed, in order', async () => {
    const first = await open(`site=${w1.siteId}&unit=${w1.id}`);
    await first.readUntil(/event: ready\n/);
    hub.publish([samples(w1, '2026-12-02T10:00:00.000Z')]);
    await first.readUntil(/event: samples\n/);
    const lastId = eventsOf(first.text()).find((e) => e.event === 'samples')!.id;
    first.abort();
    // While the page is away: two more for this unit, one for another.
    hub.publish([samples(w1, '2026-12-02T10:00:10.000Z'), samples(w2), samples(w1, '2026-12-02T10:00:20.000Z')]);
    const again = await open(`site=${w1.siteId}&unit=${w1.id}`, { 'Last-Event-ID': lastId });
    await again.readUntil(/event: ready\n/);
    const events = eventsOf(again.text());
    expect(events.map((e) => [e.event, e.data.lastTs])).toEqual([
      ['samples', '2026-12-02T10:00:10.000Z'],
      ['samples', '2026-12-02T10:00:20.000Z'],
      ['ready', undefined],
    ]);
    expect(events[2]!.id).toBe(hub.currentId());
    again.abort();
  });

  it('sends a reset when the id is from another run of the server or older than the events kept', async () => {
    const otherRun = await open(`site=${w1.siteId}`, { 'Last-Event-ID': 'zzzz-12' });
    await otherRun.readUntil(/event: reset\n/);
    expect(otherRun.text()).not.toMatch(/event: ready/);
    otherRun.abort();
    const oldest = hub.currentId();
    // More events than the ring keeps.
    hub.publish(Array.from({ length: 2100 }, () => samples(w2)));
    const tooOld = await open(`site=${w1.siteId}`, { 'Last-Event-ID': oldest.replace(/-\d+$/, '-1') });
    await tooOld.readUntil(/event: reset\n/);
    tooOld.abort();
  });

  it('sends a heartbeat comment every 15 s', async () => {
    vi.useFakeTimers({ toFake: ['setInterval', 'clearInterval'] });
    try {
      const s = await open(`site=${w1.siteId}`);
      await s.readUntil(/event: ready\n/);
      expect(s.text()).not.toMatch(/: heartbeat/);
      vi.advanceTimersByTime(14_999);
      vi.advanceTimersByTime(1);
      await s.readUntil(/\n: heartbeat [^\n]+\n\n/);
      vi.advanceTimersByTime(15_000);
      await s.readUntil(/(: heartbeat [^\n]+\n\n[^]*){2}/);
      s.abort();
    } finally {
      vi.useRealTimers();
    }
  });

  it('lets go of its subscription, its timer and its place when the client goes away', async () => {
    vi.useFakeTimers({ toFake: ['setInterval', 'clearInterval'] });
    try {
      const streamsBefore = hub.openStreams();
      const subscribersBefore = hub.subscribers();
      const s = await open(`site=${w1.siteId}`);
      await s.readUntil(/event: ready\n/);
      expect(hub.openStreams()).toBe(streamsBefore + 1);
      expect(hub.subscribers()).toBe(subscribersBefore + 1);
      expect(vi.getTimerCount()).toBe(1);
      s.abort();
      expect(hub.openStreams()).toBe(streamsBefore);
      expect(hub.subscribers()).toBe(subscribersBefore);
      expect(vi.getTimerCount()).toBe(0);
      // The body ends for whoever still reads it.
      await expect(s.ended()).resolves.toBe(true);
    } finally {
      vi.useRealTimers();
    }
  });

  it(`keeps at most LIVE_MAX_STREAMS (${LIMIT}) open, answering 503 with Retry-After beyond`, async () => {
    expect(hub.openStreams()).toBe(0);
    const streams = await Promise.all(Array.from({ length: LIMIT }, () => open(`site=${w1.siteId}`)));
    const over = await GET(new Request(`http://localhost/api/live?site=${w1.siteId}`));
    expect(over.status).toBe(503);
    expect(Number(over.headers.get('retry-after'))).toBeGreaterThan(0);
    expect(((await over.json()) as { error: { message: string } }).error.message).toMatch(/too many live streams/);
    streams[0]!.abort();
    const next = await open(`site=${w1.siteId}`);
    expect(next.response.status).toBe(200);
    for (const s of [...streams, next]) s.abort();
    expect(hub.openStreams()).toBe(0);
  });
});

describe('GET /api/live: the database out of reach', () => {
  it('answers 503 with Retry-After instead of an error page', async () => {
    const g = globalThis as typeof globalThis & { __millraceDatabase?: Promise<unknown> };
    const kept = g.__millraceDatabase;
    const down = Promise.reject(new Error('connection refused'));
    down.catch(() => {});
    g.__millraceDatabase = down;
    try {
      const res = await GET(new Request(`http://localhost/api/live?site=${w1.siteId}`));
      expect(res.status).toBe(503);
      expect(Number(res.headers.get('retry-after'))).toBeGreaterThan(0);
      expect(((await res.json()) as { error: { code: string } }).error.code).toBe('unavailable:live');
      expect(hub.openStreams()).toBe(0);
    } finally {
      g.__millraceDatabase = kept;
    }
  });
});
