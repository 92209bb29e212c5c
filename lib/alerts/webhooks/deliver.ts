/**
 * The webhook delivery loop: takes due messages from the queue, posts each
 * signed (Standard Webhooks headers, contract section 7), records every
 * attempt, and retries with exponential backoff under the same webhook-id
 * until delivered or given up. It runs on its own timer, never in the ingest
 * path, and sends concurrently with a bound per endpoint, so a dead or slow
 * endpoint holds up neither ingest nor the other endpoints.
 *
 * Several processes may run it against one PostgreSQL: a message is claimed
 * with `FOR UPDATE SKIP LOCKED` and leased for longer than an attempt can
 * take, so no two processes send it at once. Should a process die mid-attempt,
 * the lease runs out and another sends it again with the same id (receivers
 * drop a repeated id, as the specification asks of them).
 */
import { and, asc, eq, inArray, isNull, lte, sql } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { webhookAttempts, webhookDeliveries, webhookEndpoints } from '@/db/schema';
import type { Logger } from '@/lib/log/logger';
import { endpointLabel } from './queries';
import { webhookHeaders } from './sign';

/** An attempt without an answer within this is a failure (the endpoint is slow or gone). */
export const WEBHOOK_TIMEOUT_MS = 10_000;
/** The first retry waits this long; each next one twice the last. */
export const WEBHOOK_FIRST_RETRY_MS = 5_000;
/** No wait between attempts is longer than this. */
export const WEBHOOK_MAX_RETRY_MS = 10 * 60_000;
/** A message not delivered this long after it was queued is given up (the attempt at this age is the last). */
export const WEBHOOK_GIVE_UP_AFTER_MS = 24 * 3_600_000;
/** Attempts in flight at once, in one process. */
export const WEBHOOK_CONCURRENCY = 8;
/** Attempts in flight at once to one endpoint, so a slow one leaves room for the others. */
export const WEBHOOK_PER_ENDPOINT = 2;
/** How long a claimed message stays with the process that claimed it: longer than any attempt. */
export const WEBHOOK_LEASE_MS = 60_000;
/** Characters of a refusing endpoint's answer kept with the attempt. */
const ANSWER_CHARS = 300;

/** When to try again. */
export interface RetryPolicy {
  readonly firstMs: number;
  readonly maxMs: number;
  readonly giveUpAfterMs: number;
}

export const DEFAULT_RETRY_POLICY: RetryPolicy = { firstMs: WEBHOOK_FIRST_RETRY_MS, maxMs: WEBHOOK_MAX_RETRY_MS, giveUpAfterMs: WEBHOOK_GIVE_UP_AFTER_MS };

/**
 * After the `attempts`-th failed attempt (1 for the first), when to try next,
 * or `undefined` when the message is given up: the waits are first, 2×first,
 * 4×first … capped at maxMs, and never past createdAt + giveUpAfterMs.
 * @example retryAt({ attempts: 3, createdAtMs: 0, nowMs: 40_000, policy: DEFAULT_RETRY_POLICY }) // 60_000
 */
export function retryAt({ attempts, createdAtMs, nowMs, policy = DEFAULT_RETRY_POLICY }: { attempts: number; createdAtMs: number; nowMs: number; policy?: RetryPolicy }): number | undefined {
  if (!Number.isSafeInteger(attempts) || attempts < 1) throw new RangeError(`attempts: expected a whole number from 1, got ${attempts}`);
  const deadline = createdAtMs + policy.giveUpAfterMs;
  if (nowMs >= deadline) return undefined;
  const waitMs = Math.min(policy.firstMs * 2 ** Math.min(attempts - 1, 40), policy.maxMs);
  return Math.min(nowMs + waitMs, deadline);
}

export interface WebhookDeliveryOptions {
  db: Db;
  log: Logger;
  /** How often to look for due messages when nobody kicks. */
  pollMs: number;
  fetchImpl?: typeof fetch;
  /** The clock of the queue (scheduling, give-up, the webhook-timestamp); attempt durations use the real one. */
  now?: () => number;
  retry?: RetryPolicy;
  timeoutMs?: number;
  concurrency?: number;
  perEndpoint?: number;
}

export interface WebhookDelivery {
  /** Look for due messages now (after enqueueing some). */
  kick(): void;
  /** Stops the loop; attempts in flight are cut short, recorded and left due. Resolves once all is written. */
  stop(): Promise<void>;
}

interface Claimed {
  id: number;
  endpointId: number;
  messageId: string;
  body: string;
  createdAt: Date;
  attempts: number;
  url: string;
  secret: string;
}

/** What one attempt came to. */
interface Outcome {
  status: number | null;
  error: string | null;
  durationMs: number;
  /** Cut short by stop(): due again at once, no backoff. */
  interrupted: boolean;
}

/** Claims up to `limit` due messages, at most `perEndpoint` minus those in flight for each endpoint. */
async function claimDue({ db, nowMs, limit, inFlight, perEndpoint, leaseMs }: { db: Db; nowMs: number; limit: number; inFlight: ReadonlyMap<number, number>; perEndpoint: number; leaseMs: number }): Promise<Claimed[]> {
  const d = webhookDeliveries;
  return db.transaction(async (tx) => {
    const due = await tx
      .select({ id: d.id, endpointId: d.endpointId })
      .from(d)
      .innerJoin(webhookEndpoints, eq(webhookEndpoints.id, d.endpointId))
      .where(and(isNull(d.deliveredAt), isNull(d.givenUpAt), lte(d.nextAttemptAt, new Date(nowMs)), eq(webhookEndpoints.enabled, true)))
      .orderBy(asc(d.nextAttemptAt), asc(d.id))
      .limit(limit * 4)
      .for('update', { of: d, skipLocked: true });
    const taken = new Map(inFlight);
    const chosen: number[] = [];
    for (const row of due) {
      if (chosen.length >= limit) break;
      const busy = taken.get(row.endpointId) ?? 0;
      if (busy >= perEndpoint) continue;
      taken.set(row.endpointId, busy + 1);
      chosen.push(row.id);
    }
    if (chosen.length === 0) return [];
    await tx.update(d).set({ nextAttemptAt: new Date(nowMs + leaseMs) }).where(inArray(d.id, chosen));
    return tx
      .select({ id: d.id, endpointId: d.endpointId, messageId: d.messageId, body: d.body, createdAt: d.createdAt, attempts: d.attempts, url: webhookEndpoints.url, secret: webhookEndpoints.secret })
      .from(d)
      .innerJoin(webhookEndpoints, eq(webhookEndpoints.id, d.endpointId))
      .where(inArray(d.id, chosen))
      .orderBy(asc(d.nextAttemptAt), asc(d.id));
  });
}

/** A failed fetch in words: the timeout, a refused connection, an unknown host … */
function fetchErrorWords(error: unknown, timeoutMs: number): string {
  if (error instanceof Error && error.name === 'TimeoutError') return `no answer within ${timeoutMs / 1000} s`;
  const cause = error instanceof Error ? (error.cause as (Error & { code?: string }) | undefined) : undefined;
  if (cause?.code === 'ECONNREFUSED') return 'connection refused';
  if (cause?.code === 'ENOTFOUND') return 'no such host';
  if (cause?.code === 'ECONNRESET') return 'connection reset';
  const words = cause?.message ?? (error instanceof Error ? error.message : String(error));
  return words.slice(0, ANSWER_CHARS);
}

/** Posts one message once. Never throws. */
async function attempt({ claimed, fetchImpl, timestampS, timeoutMs, stopSignal }: { claimed: Claimed; fetchImpl: typeof fetch; timestampS: number; timeoutMs: number; stopSignal: AbortSignal }): Promise<Outcome> {
  const started = performance.now();
  const elapsed = () => Math.round(performance.now() - started);
  // A timer of our own rather than AbortSignal.timeout inside AbortSignal.any: Node 20 can collect
  // such a timeout signal while the request waits, and then the attempt never times out (seen here).
  const controller = new AbortController();
  const timer = setTimeout(() => controller.abort(new DOMException('timed out', 'TimeoutError')), timeoutMs);
  const onStop = () => controller.abort(stopSignal.reason);
  if (stopSignal.aborted) onStop();
  else stopSignal.addEventListener('abort', onStop, { once: true });
  const signal = controller.signal;
  try {
    const headers = webhookHeaders({ secret: claimed.secret, id: claimed.messageId, timestampS, body: claimed.body });
    // No redirects: a signed message goes to the address its owner registered, nowhere else.
    const response = await fetchImpl(claimed.url, { method: 'POST', headers, body: claimed.body, redirect: 'manual', signal });
    if (response.ok) {
      await response.body?.cancel().catch(() => {});
      return { status: response.status, error: null, durationMs: elapsed(), interrupted: false };
    }
    const answer = await response.text().catch(() => '');
    const error = `HTTP ${response.status}${answer.trim() ? `: ${answer.trim().slice(0, ANSWER_CHARS)}` : ''}`;
    return { status: response.status, error, durationMs: elapsed(), interrupted: false };
  } catch (error) {
    if (stopSignal.aborted) return { status: null, error: 'cut short: the process stopped', durationMs: elapsed(), interrupted: true };
    return { status: null, error: fetchErrorWords(error, timeoutMs), durationMs: elapsed(), interrupted: false };
  } finally {
    clearTimeout(timer);
    stopSignal.removeEventListener('abort', onStop);
  }
}

/** What the delivery row becomes after an attempt. */
function nextState(claimed: Claimed, outcome: Outcome, nowMs: number, policy: RetryPolicy): { deliveredAt: Date | null; givenUpAt: Date | null; nextAttemptAt: Date | null } {
  const now = new Date(nowMs);
  if (outcome.status !== null && outcome.status >= 200 && outcome.status < 300) return { deliveredAt: now, givenUpAt: null, nextAttemptAt: null };
  if (outcome.interrupted) return { deliveredAt: null, givenUpAt: null, nextAttemptAt: now };
  const next = retryAt({ attempts: claimed.attempts + 1, createdAtMs: claimed.createdAt.getTime(), nowMs, policy });
  return next === undefined ? { deliveredAt: null, givenUpAt: now, nextAttemptAt: null } : { deliveredAt: null, givenUpAt: null, nextAttemptAt: new Date(next) };
}

/** Writes the attempt and the delivery's new state together. */
async function record({ db, claimed, outcome, nowMs, policy }: { db: Db; claimed: Claimed; outcome: Outcome; nowMs: number; policy: RetryPolicy }) {
  const state = nextState(claimed, outcome, nowMs, policy);
  await db.transaction(async (tx) => {
    await tx.insert(webhookAttempts).values({ deliveryId: claimed.id, at: new Date(nowMs), status: outcome.status, error: outcome.error, durationMs: outcome.durationMs });
    await tx
      .update(webhookDeliveries)
      .set({ ...state, attempts: sql`${webhookDeliveries.attempts} + 1`, lastStatus: outcome.status, lastError: outcome.error })
      .where(eq(webhookDeliveries.id, claimed.id));
  });
  return state;
}

/** One line per delivery that fails (its first failure), one when it is given up, one when it gets through after failing. */
function logOutcome(log: Logger, claimed: Claimed, outcome: Outcome, state: ReturnType<typeof nextState>): void {
  const fields = { deliveryId: claimed.id, endpointId: claimed.endpointId, endpoint: endpointLabel(claimed.url), messageId: claimed.messageId, attempt: claimed.attempts + 1, status: outcome.status, error: outcome.error };
  if (state.deliveredAt) {
    if (claimed.attempts > 0) log.info('webhook delivered after failed attempts', fields);
    return;
  }
  if (state.givenUpAt) log.error('webhook given up: the endpoint did not accept it in time', fields);
  else if (outcome.interrupted) log.debug('webhook attempt cut short by stop; due again', fields);
  else if (claimed.attempts === 0) log.warn('webhook refused or unanswered; retrying with the same id', { ...fields, nextAttemptAt: state.nextAttemptAt?.toISOString() });
  else log.debug('webhook attempt failed again', { ...fields, nextAttemptAt: state.nextAttemptAt?.toISOString() });
}

/**
 * Starts the delivery loop. It polls every `pollMs` and on `kick()`; each
 * due message is posted with its signed headers (timeout 10 s), the attempt
 * recorded with its status or error and duration, and the message marked
 * delivered on a 2xx or scheduled again (5 s, 10 s, 20 s … at most 10 min
 * apart) until 24 h after it was queued, then given up.
 */
export function startWebhookDelivery(options: WebhookDeliveryOptions): WebhookDelivery {
  const { db, log, pollMs, fetchImpl = fetch, now = Date.now, retry = DEFAULT_RETRY_POLICY } = options;
  const timeoutMs = options.timeoutMs ?? WEBHOOK_TIMEOUT_MS;
  const concurrency = options.concurrency ?? WEBHOOK_CONCURRENCY;
  const perEndpoint = options.perEndpoint ?? WEBHOOK_PER_ENDPOINT;
  if (!(pollMs > 0)) throw new RangeError(`pollMs: expected milliseconds above 0, got ${pollMs}`);
  const leaseMs = Math.max(WEBHOOK_LEASE_MS, timeoutMs * 2);
  const stopping = new AbortController();
  const inFlight = new Set<Promise<void>>();
  const perEndpointBusy = new Map<number, number>();
  let timer: NodeJS.Timeout | undefined;
  let claiming: Promise<void> | undefined;
  let again = false;
  let failing = false;

  const send = async (claimed: Claimed) => {
    if (stopping.signal.aborted) {
      // Claimed as the loop stopped and never sent: due again at once for whichever process runs next.
      await db.update(webhookDeliveries).set({ nextAttemptAt: new Date(now()) }).where(eq(webhookDeliveries.id, claimed.id)).catch(() => {});
      return;
    }
    const outcome = await attempt({ claimed, fetchImpl, timestampS: Math.floor(now() / 1000), timeoutMs, stopSignal: stopping.signal });
    try {
      const state = await record({ db, claimed, outcome, nowMs: now(), policy: retry });
      logOutcome(log, claimed, outcome, state);
    } catch (error) {
      // The lease runs out and the message is sent again with the same id: a repeat, never a loss.
      log.error('webhook attempt could not be recorded; it will be sent again', { deliveryId: claimed.id, messageId: claimed.messageId, status: outcome.status, error });
    }
  };

  const start = (claimed: Claimed) => {
    perEndpointBusy.set(claimed.endpointId, (perEndpointBusy.get(claimed.endpointId) ?? 0) + 1);
    const running: Promise<void> = send(claimed).finally(() => {
      inFlight.delete(running);
      const left = (perEndpointBusy.get(claimed.endpointId) ?? 1) - 1;
      if (left > 0) perEndpointBusy.set(claimed.endpointId, left);
      else perEndpointBusy.delete(claimed.endpointId);
      kick();
    });
    inFlight.add(running);
  };

  const claimOnce = async () => {
    const free = concurrency - inFlight.size;
    if (free <= 0 || stopping.signal.aborted) return;
    try {
      const claimed = await claimDue({ db, nowMs: now(), limit: free, inFlight: perEndpointBusy, perEndpoint, leaseMs });
      if (failing) log.info('webhook queue readable again');
      failing = false;
      for (const c of claimed) start(c);
    } catch (error) {
      if (!failing) log.error('webhook queue could not be read; trying again', { error });
      failing = true;
    }
  };

  function kick(): void {
    if (stopping.signal.aborted) return;
    if (claiming) {
      again = true;
      return;
    }
    clearTimeout(timer);
    claiming = claimOnce().finally(() => {
      claiming = undefined;
      if (stopping.signal.aborted) return;
      if (again) {
        again = false;
        kick();
      } else timer = setTimeout(kick, pollMs);
    });
  }

  timer = setTimeout(kick, 0);
  return {
    kick,
    async stop() {
      stopping.abort();
      clearTimeout(timer);
      await claiming;
      // A claim that finished after the abort started its attempts, which end at once.
      await Promise.all([...inFlight]);
    },
  };
}
