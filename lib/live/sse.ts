/**
 * One Server-Sent Events stream of the live feed, for one page: the events of
 * one site (or one unit), each with its id, a heartbeat comment every 15 s so
 * that proxies keep the connection open, and a resume from `Last-Event-ID`
 * (the events missed, from the hub's ring, or a `reset` telling the page to
 * reload when they are gone). Everything is let go when the client leaves.
 *
 * Events on the wire:
 *   event: ready      id: <newest id>   data: {}             (first, so a reconnect always has an id to resume from)
 *   event: samples    id: <id>          data: {"type":"samples","siteId","unitId","lastTs"}
 *   event: diagnosis  id: <id>          data: {"type":"diagnosis","siteId","unitId","verdict","previousVerdict"?}
 *   event: reset      id: <newest id>   data: {"reason": "..."}   (events were missed: reload the page)
 */
import type { LiveEvent } from './events';
import type { LiveHub, StampedEvent } from './hub';

/** Milliseconds between heartbeat comments. */
export const HEARTBEAT_MS = 15_000;
/** How long a browser waits before reconnecting after the stream drops, ms (the SSE `retry` field). */
export const RECONNECT_MS = 3_000;
/** Events queued for a client that does not read; past this the stream is closed and the client resumes by id. */
export const MAX_QUEUED_EVENTS = 512;

export const SSE_HEADERS: Readonly<Record<string, string>> = Object.freeze({
  'Content-Type': 'text/event-stream; charset=utf-8',
  // no-transform: compression in front (Next's own, a proxy's) would hold events back.
  'Cache-Control': 'no-cache, no-transform',
  'X-Accel-Buffering': 'no',
  Connection: 'keep-alive',
});

export interface LiveStreamOptions {
  hub: LiveHub;
  siteId: string;
  unitId?: string;
  /** The `Last-Event-ID` the browser sent when it reconnected. */
  lastEventId?: string | null;
  /** The request's signal: aborted when the client goes away. */
  signal: AbortSignal;
  heartbeatMs?: number;
}

function frame(event: string, id: string, data: unknown): string {
  return `event: ${event}\nid: ${id}\ndata: ${JSON.stringify(data)}\n\n`;
}

/** The events a page hears of; others on the feed (device credentials) are for the server itself. */
const PAGE_EVENTS: ReadonlySet<LiveEvent['type']> = new Set(['samples', 'diagnosis', 'alert']);

/** Whether `event` is for the page following `siteId` (and `unitId`). */
export function matchesScope(event: LiveEvent, siteId: string, unitId?: string): boolean {
  return PAGE_EVENTS.has(event.type) && event.siteId === siteId && (unitId === undefined || event.unitId === unitId);
}

/**
 * The body of one live stream. The caller has taken a stream place on the hub
 * (`hub.openStream`); it is given back when the stream ends, however it ends.
 */
export function createLiveStream(options: LiveStreamOptions): ReadableStream<Uint8Array> {
  const { hub, siteId, unitId, signal } = options;
  const encoder = new TextEncoder();
  let cleanup: (() => void) | undefined;

  return new ReadableStream<Uint8Array>(
    {
      start(controller) {
        let closed = false;
        const unsubscribers: Array<() => void> = [];
        const timer: { heartbeat?: ReturnType<typeof setInterval> } = {};
        const end = () => {
          if (closed) return;
          closed = true;
          for (const u of unsubscribers) u();
          if (timer.heartbeat !== undefined) clearInterval(timer.heartbeat);
          signal.removeEventListener('abort', end);
          hub.closeStream();
          try {
            controller.close();
          } catch {
            // already closed or errored by the reader going away
          }
        };
        cleanup = end;
        const send = (text: string) => {
          if (closed) return;
          // A client that stopped reading: let it go; it resumes from its last id.
          if ((controller.desiredSize ?? 0) < -MAX_QUEUED_EVENTS) {
            end();
            return;
          }
          controller.enqueue(encoder.encode(text));
        };
        const sendEvent = (stamped: StampedEvent) => {
          if (matchesScope(stamped.event, siteId, unitId)) send(frame(stamped.event.type, stamped.id, stamped.event));
        };

        if (signal.aborted) {
          end();
          return;
        }
        signal.addEventListener('abort', end, { once: true });
        send(`retry: ${RECONNECT_MS}\n: live updates for ${unitId ? `${siteId}/${unitId}` : siteId}\n\n`);
        // Subscribing and reading the ring happen in one turn: nothing can fall between them.
        unsubscribers.push(hub.subscribe(sendEvent));
        unsubscribers.push(hub.onReset(() => send(frame('reset', hub.currentId(), { reason: 'the server may have missed changes' }))));
        const resume = options.lastEventId ? hub.since(options.lastEventId) : undefined;
        if (resume?.kind === 'reset') {
          send(frame('reset', hub.currentId(), { reason: 'the changes since this page last heard are no longer kept' }));
        } else {
          for (const stamped of resume?.events ?? []) sendEvent(stamped);
          send(frame('ready', hub.currentId(), {}));
        }
        timer.heartbeat = setInterval(() => send(`: heartbeat ${new Date().toISOString()}\n\n`), options.heartbeatMs ?? HEARTBEAT_MS);
        // A timer must not keep a process alive for a stream nobody reads.
        (timer.heartbeat as { unref?: () => void }).unref?.();
      },
      cancel() {
        cleanup?.();
      },
    },
    { highWaterMark: 1, size: () => 1 },
  );
}
