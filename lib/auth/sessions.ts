/**
 * Sessions of signed-in people. The cookie holds a random 256-bit token; the
 * server keeps only its SHA-256. A session ends when unused for the idle time
 * (SESSION_IDLE_HOURS, default 12 h) or at the absolute limit after sign-in
 * (SESSION_MAX_DAYS, default 7 days), at sign-out, when its person is
 * disabled, or when an admin resets their password. A new session is made at
 * every sign-in (the token is never carried over from before sign-in).
 *
 * Defaults: a control room leaves a page open all day; the open page's live
 * updates keep its session in use, so it lasts the week, and a screen left
 * overnight with the page closed asks for the password in the morning. Wall
 * screens use display links instead (lib/auth/display-links.ts).
 */
import { and, eq, gt, lt, ne, or } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { people, sessions, type PersonRow, type SessionRow } from '@/db/schema';
import { hashSecret, looksLikeSecret, newSecret } from './secrets';

export interface SessionTimes {
  idleHours: number;
  maxDays: number;
}

const HOUR_MS = 3_600_000;
/** The last-seen time is written at most this often (not on every request). */
const TOUCH_EVERY_MS = 60_000;

/** Cookie name: `__Host-` prefixed (Secure, path /, no Domain) except on plain-HTTP localhost, where browsers refuse Secure cookies. */
export function sessionCookieName(secure: boolean): string {
  return secure ? '__Host-millrace-session' : 'millrace-session';
}

/** Cookie attributes (HttpOnly, SameSite=Lax, Secure unless plain-HTTP localhost). */
export function sessionCookieOptions(secure: boolean, maxAgeS: number) {
  return { httpOnly: true, sameSite: 'lax' as const, secure, path: '/', maxAge: maxAgeS };
}

/** Starts a session; returns the token for the cookie (shown nowhere else) and the session. */
export async function createSession({
  db,
  personId,
  times,
  ip,
  userAgent,
  now = new Date(),
}: {
  db: Db;
  personId: number;
  times: SessionTimes;
  ip?: string | null;
  userAgent?: string | null;
  now?: Date;
}): Promise<{ token: string; session: SessionRow }> {
  const token = newSecret('session');
  const [session] = await db
    .insert(sessions)
    .values({
      tokenHash: hashSecret(token),
      personId,
      createdAt: now,
      lastSeenAt: now,
      idleExpiresAt: new Date(now.getTime() + times.idleHours * HOUR_MS),
      absoluteExpiresAt: new Date(now.getTime() + times.maxDays * 24 * HOUR_MS),
      ip: ip ?? null,
      userAgent: userAgent?.slice(0, 300) ?? null,
    })
    .returning();
  // Expired sessions of anyone are cleared now and then, here, where sessions are made.
  await db.delete(sessions).where(or(lt(sessions.idleExpiresAt, now), lt(sessions.absoluteExpiresAt, now)));
  return { token, session: session! };
}

/**
 * The live session of a cookie's token and its person, or undefined (no such
 * session, expired, or the person disabled). Moves the idle expiry on.
 */
export async function resolveSession({
  db,
  token,
  times,
  now = new Date(),
}: {
  db: Db;
  token: string;
  times: SessionTimes;
  now?: Date;
}): Promise<{ session: SessionRow; person: PersonRow } | undefined> {
  if (!looksLikeSecret('session', token)) return undefined;
  const [row] = await db
    .select({ session: sessions, person: people })
    .from(sessions)
    .innerJoin(people, eq(people.id, sessions.personId))
    .where(and(eq(sessions.tokenHash, hashSecret(token)), gt(sessions.idleExpiresAt, now), gt(sessions.absoluteExpiresAt, now)))
    .limit(1);
  if (!row || row.person.disabled) return undefined;
  if (now.getTime() - row.session.lastSeenAt.getTime() >= TOUCH_EVERY_MS) {
    const idleExpiresAt = new Date(Math.min(now.getTime() + times.idleHours * HOUR_MS, row.session.absoluteExpiresAt.getTime()));
    await db.update(sessions).set({ lastSeenAt: now, idleExpiresAt }).where(eq(sessions.id, row.session.id));
    row.session.lastSeenAt = now;
    row.session.idleExpiresAt = idleExpiresAt;
  }
  return row;
}

/** Ends the session of a token (sign-out). */
export async function endSession({ db, token }: { db: Db; token: string }): Promise<SessionRow | undefined> {
  const [ended] = await db.delete(sessions).where(eq(sessions.tokenHash, hashSecret(token))).returning();
  return ended;
}

/** Ends every session of a person, but the one kept (their own, after they change their password). */
export async function endSessionsOfPerson({ db, personId, keepSessionId }: { db: Db; personId: number; keepSessionId?: number }): Promise<number> {
  const ended = await db
    .delete(sessions)
    .where(keepSessionId === undefined ? eq(sessions.personId, personId) : and(eq(sessions.personId, personId), ne(sessions.id, keepSessionId)))
    .returning({ id: sessions.id });
  return ended.length;
}
