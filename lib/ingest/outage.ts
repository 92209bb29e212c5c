/**
 * Whether the database can be reached, as the commits find it. An outage is
 * logged once when it starts and once when it ends, however many retries
 * fail in between: a log line per retry would bury everything else.
 */
import type { Logger } from '@/lib/log/logger';

/** The database as the commits last found it. */
export interface DatabaseReachability {
  reachable: boolean;
  /** Start of the outage under way, epoch ms. */
  outageSinceMs?: number;
  /** Outages since start. */
  outages: number;
  /** Message of the last failed commit (kept after the outage ends). */
  lastError?: string;
}

export interface OutageTrackerOptions {
  log: Logger;
  /** The database's location, for the log. */
  location: string;
  now: () => number;
  /** Samples held uncommitted now, for the log. */
  held: () => number;
}

/** Tracks outages of the database (see the module comment). */
export class OutageTracker {
  private readonly state: DatabaseReachability = { reachable: true, outages: 0 };

  constructor(private readonly options: OutageTrackerOptions) {}

  /** A commit failed for want of the database; the first failure of an outage starts it. */
  failed(error: unknown): void {
    const { state } = this;
    state.lastError = error instanceof Error ? error.message : String(error);
    if (!state.reachable) return;
    state.reachable = false;
    state.outageSinceMs = this.options.now();
    state.outages++;
    this.options.log.error('database unreachable: holding messages unacknowledged and retrying', {
      database: this.options.location,
      error,
      bufferedSamples: this.options.held(),
    });
  }

  /** A commit went through; ends the outage under way, if any. */
  succeeded(): void {
    const { state, options } = this;
    if (state.reachable) return;
    state.reachable = true;
    options.log.info('database reachable again', {
      database: options.location,
      outageMs: options.now() - (state.outageSinceMs ?? options.now()),
      bufferedSamples: options.held(),
    });
    state.outageSinceMs = undefined;
  }

  /** A copy of the state. */
  snapshot(): DatabaseReachability {
    return { ...this.state };
  }
}
