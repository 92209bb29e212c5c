/**
 * The web side of the live feed, one per process: events arrive (published
 * in this process, or heard through LISTEN), get an id, wait in a bounded
 * ring of recent events for streams that resume, and go to every subscriber.
 *
 * Kept on globalThis: Next's bundled route code and the server's own modules
 * are separate module instances in one process (like db/client.ts
 * getDatabase() and lib/server/registry.ts), and both must reach the same hub.
 */
import type { LiveEvent } from './events';

/** An event with its id on this process's feed. */
export interface StampedEvent {
  readonly id: string;
  readonly seq: number;
  readonly event: LiveEvent;
}

export type LiveListener = (stamped: StampedEvent) => void;

/** Where a stream that resumes from an id stands. */
export type ResumePoint =
  | { kind: 'replay'; events: StampedEvent[] }
  /** The id is from another run of the process, from the future, or older than the ring: the page must reload. */
  | { kind: 'reset' };

export interface LiveHub {
  /** Stamps and delivers events, in order. */
  publish(events: readonly LiveEvent[]): void;
  /** Delivers every later event to `listener`; returns the unsubscribe function. */
  subscribe(listener: LiveListener): () => void;
  /** Tells every subscriber that events may have been missed (the LISTEN connection was lost). */
  publishReset(): void;
  /** Subscribers to resets; returns the unsubscribe function. */
  onReset(listener: () => void): () => void;
  /** The events after `lastEventId` still in the ring, or a reset. */
  since(lastEventId: string): ResumePoint;
  /** The id of the newest event so far (for a stream to start from). */
  currentId(): string;
  /** Takes one of `limit` stream places; false when all are taken. */
  openStream(limit: number): boolean;
  /** Gives a stream place back. */
  closeStream(): void;
  /** Streams open now. */
  openStreams(): number;
  /** Subscribers now (streams and anything else listening). */
  subscribers(): number;
}

/** Events kept for streams that resume: at a few events a second, some minutes. */
export const DEFAULT_RING_SIZE = 2048;

/**
 * A hub of its own (tests); the process's one is {@link getLiveHub}.
 * Ids read `<run>-<seq>`: `run` changes with each process, so an id from
 * before a restart is told apart from a new one.
 */
export function createLiveHub({ ringSize = DEFAULT_RING_SIZE, run = Date.now().toString(36) }: { ringSize?: number; run?: string } = {}): LiveHub {
  if (!Number.isInteger(ringSize) || ringSize < 1) throw new RangeError(`ringSize must be a whole number of at least 1, got ${ringSize}`);
  const ring: StampedEvent[] = new Array(ringSize);
  let seq = 0;
  const listeners = new Set<LiveListener>();
  const resetListeners = new Set<() => void>();
  let streams = 0;

  return {
    publish(events) {
      for (const event of events) {
        seq++;
        const stamped: StampedEvent = { id: `${run}-${seq}`, seq, event };
        ring[seq % ringSize] = stamped;
        for (const listener of listeners) {
          try {
            listener(stamped);
          } catch {
            // One broken subscriber must not keep the event from the others.
          }
        }
      }
    },
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
    publishReset() {
      for (const listener of resetListeners) {
        try {
          listener();
        } catch {
          // as above
        }
      }
    },
    onReset(listener) {
      resetListeners.add(listener);
      return () => resetListeners.delete(listener);
    },
    since(lastEventId) {
      const match = /^([a-z0-9]+)-(\d+)$/.exec(lastEventId.trim());
      if (!match || match[1] !== run) return { kind: 'reset' };
      const after = Number(match[2]);
      if (after > seq) return { kind: 'reset' };
      const oldest = Math.max(1, seq - ringSize + 1);
      // Events after `after` must all still be in the ring.
      if (after + 1 < oldest) return { kind: 'reset' };
      const events: StampedEvent[] = [];
      for (let s = after + 1; s <= seq; s++) events.push(ring[s % ringSize]!);
      return { kind: 'replay', events };
    },
    currentId: () => `${run}-${seq}`,
    openStream(limit) {
      if (streams >= limit) return false;
      streams++;
      return true;
    },
    closeStream() {
      streams = Math.max(0, streams - 1);
    },
    openStreams: () => streams,
    subscribers: () => listeners.size,
  };
}

type GlobalWithHub = typeof globalThis & { __millraceLiveHub?: LiveHub };

/** This process's hub. */
export function getLiveHub(): LiveHub {
  const g = globalThis as GlobalWithHub;
  g.__millraceLiveHub ??= createLiveHub();
  return g.__millraceLiveHub;
}
