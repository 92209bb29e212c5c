/**
 * The workers' side of the live feed. The ingester (once per committed
 * batch) and the live diagnosis (once per written batch of units) hand their
 * events here; nothing here runs per sample.
 *
 * Embedded (PGlite): everything is one process, so events go straight to the
 * process's hub. PostgreSQL: web and ingester may be separate processes, so
 * events go out as NOTIFY on {@link LIVE_CHANNEL} after the commit, packed
 * into as few payloads as fit under the 8000-byte limit, in one statement; the
 * web side LISTENs (listener.ts). At most one NOTIFY statement is in flight:
 * events arriving meanwhile are coalesced per unit (the newest kept) and sent
 * together after it, so a slow database never piles statements up.
 */
import type { DatabaseHandle } from '@/db/client';
import type { Logger } from '@/lib/log/logger';
import { LIVE_CHANNEL, packPayloads, type LiveEvent } from './events';
import { getLiveHub, type LiveHub } from './hub';

export interface LivePublisher {
  /** Queues events; sent on the next turn of the event loop. Never throws, never waits. */
  publish(events: readonly LiveEvent[]): void;
  /** Sends what is queued and resolves when it is out (or failed). */
  flush(): Promise<void>;
  /** NOTIFY statements sent and events dropped for a failure, for the health report. */
  state(): { mode: 'in-process' | 'notify'; sent: number; failed: number };
}

function keyOf(event: LiveEvent): string {
  return `${event.type}\u0000${event.siteId}\u0000${event.unitId}`;
}

/**
 * A publisher for `handle`'s backend; `hub` is the process's unless given
 * (tests), and only used on PGlite.
 */
export function createLivePublisher({ handle, hub, log }: { handle: DatabaseHandle; hub?: LiveHub; log?: Logger }): LivePublisher {
  const pending = new Map<string, LiveEvent>();
  let scheduled = false;
  let inFlight: Promise<void> | undefined;
  let sent = 0;
  let failed = 0;
  let failing = false;
  const notify = handle.backend === 'postgres' && handle.sql !== undefined;
  const target = hub ?? getLiveHub();

  const send = async (events: LiveEvent[]): Promise<void> => {
    if (!notify) {
      target.publish(events);
      sent++;
      return;
    }
    const payloads = packPayloads(events);
    try {
      await handle.sql!.unsafe('select pg_notify($1, p) from unnest($2::text[]) as p', [LIVE_CHANNEL, payloads]);
      sent += payloads.length;
      if (failing) {
        failing = false;
        log?.info('live feed: NOTIFY works again', {});
      }
    } catch (error) {
      failed += events.length;
      // Open pages miss a refresh, nothing more; logged once per outage.
      if (!failing) {
        failing = true;
        log?.warn('live feed: NOTIFY failed; open pages will not refresh until it works again', { error });
      }
    }
  };

  const drain = (): Promise<void> => {
    scheduled = false;
    if (inFlight) return inFlight;
    if (pending.size === 0) return Promise.resolve();
    const events = [...pending.values()];
    pending.clear();
    inFlight = send(events).finally(() => {
      inFlight = undefined;
      if (pending.size > 0) void drain();
    });
    return inFlight;
  };

  return {
    publish(events) {
      if (events.length === 0) return;
      for (const event of events) pending.set(keyOf(event), event);
      if (!scheduled) {
        scheduled = true;
        setImmediate(() => void drain());
      }
    },
    async flush() {
      while (inFlight || pending.size > 0) await drain();
    },
    state: () => ({ mode: notify ? 'notify' : 'in-process', sent, failed }),
  };
}
