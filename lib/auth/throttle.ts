/**
 * Sign-in throttling that slows a password-guesser without letting anyone
 * lock a real person out (ASVS 5.0 6.3.1: rate limiting must not become a
 * denial of service).
 *
 * Three counters of failed sign-ins, each forgotten after a day without a
 * failure:
 * - per address (`address:IP`): 20 failures free (a control room's people may
 *   share one address behind NAT), then a wait;
 * - per account (`account:EMAIL`, counted for addresses nobody has, too, so
 *   the answer never tells whether an account exists): 5 free, then a wait;
 * - per account and address (`pair:EMAIL IP`): 5 free, then a wait.
 * Each failure beyond the free ones makes the wait 2^k seconds (k = failures
 * beyond), at most 15 minutes: an attacker gets a few hundred guesses a day
 * per account, a person who mistypes a few times waits seconds.
 *
 * Why a burst across many addresses cannot lock the real person out: the
 * account's wait does not apply to an address this account has signed in
 * from before (a pair with a success in the last 90 days). Failures from
 * other addresses, however many, never block the person's own desk or phone,
 * and attempts from such an address do not add to the account's count.
 * From a new address the person waits at most 15 minutes between tries, and
 * the audit log shows the failures. What still blocks the person is a wait of
 * their own address or pair, which only failures from that address cause.
 *
 * Attempts are counted before the password is checked (and the count undone
 * on success), inside a transaction that locks the three rows, so that a
 * burst of parallel requests is counted one by one and not all let through.
 * An attempt refused for a wait is not counted, so retrying never lengthens
 * the wait. The address is the one the web server sees (HOST behind a proxy
 * that rewrites it would make every address the proxy's: see DEVELOPERS.md).
 */
import { inArray, sql } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { signInThrottle, type SignInThrottleRow } from '@/db/schema';

export const FREE_FAILURES = { address: 20, account: 5, pair: 5 } as const;
export const MAX_WAIT_S = 15 * 60;
/** Failures older than this are forgotten. */
export const FORGET_AFTER_MS = 24 * 3_600_000;
/** An address where the account signed in within this time is known to be the person's. */
export const KNOWN_GOOD_MS = 90 * 24 * 3_600_000;

type Scope = keyof typeof FREE_FAILURES;

/** Seconds to wait after `failures` failures with `free` of them free (0: no wait). */
export function waitSeconds(failures: number, free: number): number {
  const beyond = failures - free;
  return beyond <= 0 ? 0 : Math.min(2 ** beyond, MAX_WAIT_S);
}

export function throttleKeys(email: string, ip: string): Record<Scope, string> {
  const account = email.trim().toLowerCase();
  return { address: `address:${ip}`, account: `account:${account}`, pair: `pair:${account} ${ip}` };
}

export type AttemptDecision = { allowed: true } | { allowed: false; retryAfterS: number };

async function lockRows(tx: Db, keys: Record<Scope, string>, now: Date): Promise<Record<Scope, SignInThrottleRow>> {
  const all = Object.values(keys).sort();
  await tx.insert(signInThrottle).values(all.map((key) => ({ key }))).onConflictDoNothing();
  const rows = await tx.select().from(signInThrottle).where(inArray(signInThrottle.key, all)).orderBy(signInThrottle.key).for('update');
  const out = {} as Record<Scope, SignInThrottleRow>;
  for (const scope of Object.keys(keys) as Scope[]) {
    const row = rows.find((r) => r.key === keys[scope])!;
    if (row.lastFailureAt && now.getTime() - row.lastFailureAt.getTime() > FORGET_AFTER_MS) {
      row.failures = 0;
      row.blockedUntil = null;
    }
    out[scope] = row;
  }
  return out;
}

/**
 * Decides whether a sign-in attempt may check its password now; when it may,
 * the attempt is counted as a failure until `recordSuccess` undoes it.
 */
export async function beginAttempt({ db, email, ip, now = new Date() }: { db: Db; email: string; ip: string; now?: Date }): Promise<AttemptDecision> {
  const keys = throttleKeys(email, ip);
  return db.transaction(async (tx) => {
    const rows = await lockRows(tx as unknown as Db, keys, now);
    const knownGood = rows.pair.lastSuccessAt !== null && now.getTime() - rows.pair.lastSuccessAt.getTime() < KNOWN_GOOD_MS;
    const applies: Scope[] = knownGood ? ['address', 'pair'] : ['address', 'pair', 'account'];
    const waitMs = Math.max(0, ...applies.map((s) => (rows[s].blockedUntil ? rows[s].blockedUntil.getTime() - now.getTime() : 0)));
    if (waitMs > 0) return { allowed: false as const, retryAfterS: Math.ceil(waitMs / 1000) };
    // A known-good address's attempts count for it and its pair only: they never add to the account's wait.
    for (const scope of applies) {
      const failures = rows[scope].failures + 1;
      const wait = waitSeconds(failures, FREE_FAILURES[scope]);
      await tx
        .update(signInThrottle)
        .set({ failures, lastFailureAt: now, blockedUntil: wait > 0 ? new Date(now.getTime() + wait * 1000) : null })
        .where(sql`${signInThrottle.key} = ${keys[scope]}`);
    }
    return { allowed: true as const };
  });
}

/** A right password: the attempt's count is undone, the pair cleared and marked known-good. */
export async function recordSuccess({ db, email, ip, now = new Date() }: { db: Db; email: string; ip: string; now?: Date }): Promise<void> {
  const keys = throttleKeys(email, ip);
  await db.transaction(async (tx) => {
    const rows = await lockRows(tx as unknown as Db, keys, now);
    const knownGood = rows.pair.lastSuccessAt !== null && now.getTime() - rows.pair.lastSuccessAt.getTime() < KNOWN_GOOD_MS;
    await tx
      .update(signInThrottle)
      .set({ failures: 0, blockedUntil: null, lastSuccessAt: now })
      .where(sql`${signInThrottle.key} = ${keys.pair}`);
    // Undo this attempt's count where beginAttempt made it. Those scopes were not waiting when it began
    // (else it would have been refused), so the wait it set is simply taken back.
    for (const scope of knownGood ? (['address'] as const) : (['address', 'account'] as const)) {
      const failures = Math.max(0, rows[scope].failures - 1);
      await tx.update(signInThrottle).set({ failures, blockedUntil: null }).where(sql`${signInThrottle.key} = ${keys[scope]}`);
    }
  });
}
