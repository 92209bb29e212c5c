/**
 * The web side's ear on PostgreSQL: LISTEN on the live channel and hand what
 * arrives to the process's hub. postgres-js keeps the LISTEN on a connection
 * of its own and listens again after a reconnect; whatever was notified in
 * between is lost, so each listen after the first publishes a reset (open
 * pages reload once).
 *
 * On PGlite nothing is needed: the workers publish to the hub directly.
 */
import type { DatabaseHandle } from '@/db/client';
import type { Logger } from '@/lib/log/logger';
import { LIVE_CHANNEL, unpackPayload } from './events';
import { getLiveHub, type LiveHub } from './hub';

export interface LiveListener {
  /** Payloads received, events passed on, payloads or events refused. */
  state(): { mode: 'listen' | 'in-process'; listening: boolean; payloads: number; events: number; invalid: number; listens: number };
  stop(): Promise<void>;
}

/** Starts listening for `handle`'s backend; resolves once the LISTEN is in place. */
export async function startLiveListener({ handle, hub, log }: { handle: DatabaseHandle; hub?: LiveHub; log?: Logger }): Promise<LiveListener> {
  const target = hub ?? getLiveHub();
  const counts = { payloads: 0, events: 0, invalid: 0, listens: 0 };
  if (handle.backend !== 'postgres' || !handle.sql) {
    return { state: () => ({ mode: 'in-process', listening: true, ...counts }), stop: async () => {} };
  }
  let listening = false;
  const subscription = await handle.sql.listen(
    LIVE_CHANNEL,
    (payload) => {
      counts.payloads++;
      const { events, invalid } = unpackPayload(payload);
      counts.events += events.length;
      if (invalid > 0) {
        counts.invalid += invalid;
        log?.warn('live feed: a NOTIFY payload held something that is not a live event; left out', { invalid });
      }
      target.publish(events);
    },
    () => {
      listening = true;
      counts.listens++;
      if (counts.listens > 1) {
        log?.info('live feed: listening again after a lost connection; open pages reload', {});
        target.publishReset();
      }
    },
  );
  return {
    state: () => ({ mode: 'listen', listening, ...counts }),
    async stop() {
      listening = false;
      await subscription.unlisten().catch(() => {});
    },
  };
}

type GlobalWithListener = typeof globalThis & { __millraceLiveListener?: Promise<LiveListener> };

/**
 * The process's listener on the process's hub, started once (the server
 * starts it with the web app; a route that runs first starts it too).
 */
export function ensureLiveListener(handle: DatabaseHandle, log?: Logger): Promise<LiveListener> {
  const g = globalThis as GlobalWithListener;
  if (!g.__millraceLiveListener) {
    g.__millraceLiveListener = startLiveListener({ handle, log });
    g.__millraceLiveListener.catch(() => {
      delete g.__millraceLiveListener;
    });
  }
  return g.__millraceLiveListener;
}

/** Stops the process's listener, if any (server shutdown). */
export async function stopLiveListener(): Promise<void> {
  const g = globalThis as GlobalWithListener;
  const pending = g.__millraceLiveListener;
  delete g.__millraceLiveListener;
  if (pending) await (await pending.catch(() => undefined))?.stop();
}
