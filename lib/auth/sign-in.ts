/**
 * Sign-in with e-mail and password: throttled (lib/auth/throttle.ts), the
 * same answer and about the same time whether or not the address has an
 * account, every outcome in the audit log, a new session on success.
 */
import { eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { people, type PersonRow } from '@/db/schema';
import { writeAudit } from './audit';
import { dummyPasswordHash, hashPassword, needsRehash, verifyPassword } from './passwords';
import { getPersonByEmail } from './people';
import { createSession, type SessionTimes } from './sessions';
import { beginAttempt, recordSuccess } from './throttle';

export type SignInResult =
  | { kind: 'signed-in'; token: string; person: PersonRow; mustChangePassword: boolean }
  | { kind: 'refused' }
  | { kind: 'throttled'; retryAfterS: number };

/** The words a person sees when e-mail and password do not match (the same whether the address has an account or not). */
export const REFUSED_MESSAGE = 'That e-mail address and password do not match an account that can sign in. Check both and try again.';

export async function signIn({
  db,
  email,
  password,
  ip,
  userAgent,
  times,
  now = new Date(),
}: {
  db: Db;
  email: string;
  password: string;
  ip: string;
  userAgent?: string | null;
  times: SessionTimes;
  now?: Date;
}): Promise<SignInResult> {
  const address = email.trim().slice(0, 254);
  const decision = await beginAttempt({ db, email: address, ip, now });
  if (!decision.allowed) return { kind: 'throttled', retryAfterS: decision.retryAfterS };
  const person = address ? await getPersonByEmail({ db, email: address }) : undefined;
  // Spend the same time on an address nobody has, so timing does not tell.
  const matches = await verifyPassword(password.slice(0, 1024), person?.passwordHash ?? (await dummyPasswordHash()));
  if (!person || !matches || person.disabled) {
    await writeAudit({
      db,
      actor: { personId: person?.id ?? null, label: address || '(no address)', ip },
      action: 'sign-in-failed',
      target: person ? `person ${person.email}` : null,
      detail: { reason: !person ? 'no such account' : person.disabled ? 'disabled' : 'wrong password' },
      at: now,
    });
    return { kind: 'refused' };
  }
  await recordSuccess({ db, email: address, ip, now });
  if (needsRehash(person.passwordHash)) {
    await db.update(people).set({ passwordHash: await hashPassword(password) }).where(eq(people.id, person.id));
  }
  const { token } = await createSession({ db, personId: person.id, times, ip, userAgent, now });
  await writeAudit({ db, actor: { personId: person.id, label: person.email, ip }, action: 'sign-in', target: `person ${person.email}`, at: now });
  return { kind: 'signed-in', token, person, mustChangePassword: person.mustChangePassword };
}
