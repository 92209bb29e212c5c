'use server';
/**
 * Sign-in and sign-out. Sign-in answers the same words whether or not the
 * address has an account; a throttled attempt says how long to wait. The new
 * session's cookie replaces any old one (a new token at every sign-in).
 */
import { cookies, headers } from 'next/headers';
import { redirect } from 'next/navigation';
import { z } from 'zod';
import { safeNextPath } from '@/lib/auth/access';
import { writeAudit } from '@/lib/auth/audit';
import { getPersonById } from '@/lib/auth/people';
import { clientIp, secureCookies, sessionTimes } from '@/lib/auth/request';
import { endSession, sessionCookieName, sessionCookieOptions } from '@/lib/auth/sessions';
import { REFUSED_MESSAGE, signIn } from '@/lib/auth/sign-in';
import { publicAction } from '@/lib/request/action';
import type { SignInState } from './state';

function waitWords(s: number): string {
  if (s < 60) return `${s} second${s === 1 ? '' : 's'}`;
  const m = Math.ceil(s / 60);
  return `${m} minute${m === 1 ? '' : 's'}`;
}

// Never refused here: a missing field is answered by the handler, naming the field to focus.
const signInForm = z.object({
  email: z.string().catch('').transform((s) => s.slice(0, 254)),
  password: z.string().catch(''),
  next: z.string().catch('/'),
});

export const signInAction = publicAction({ input: signInForm }, async ({ db, input, submitted }): Promise<SignInState> => {
  const { email, password } = input;
  const next = safeNextPath(input.next);
  if (!email.trim() || !password) {
    return { submitted, email, error: !email.trim() ? 'Enter your e-mail address.' : 'Enter your password.', field: !email.trim() ? 'email' : 'password' };
  }
  const h = await headers();
  const secure = secureCookies(h);
  if (secure && h.get('x-forwarded-proto')?.split(',')[0]?.trim() === 'http') {
    // A Secure cookie sent over plain HTTP to another machine is dropped by the browser: say so instead of failing silently.
    return {
      submitted,
      email,
      error: `This page reached you over plain HTTP at ${h.get('host') ?? 'this address'}, so your browser would not keep the sign-in. Open millrace over HTTPS (behind a TLS proxy), or on this machine at http://localhost.`,
    };
  }
  const result = await signIn({ db, email, password, ip: clientIp(h), userAgent: h.get('user-agent'), times: sessionTimes() });
  if (result.kind === 'throttled') {
    return { submitted, email, retryAfterS: result.retryAfterS, error: `Too many sign-in attempts. Wait ${waitWords(result.retryAfterS)}, then try again. Someone else's attempts do not lock you out of a device you have signed in from before.` };
  }
  if (result.kind === 'refused') return { submitted, email, error: REFUSED_MESSAGE };
  const jar = await cookies();
  const times = sessionTimes();
  // A session this browser held before (someone else's, on a shared screen) ends: one browser, one session.
  const previousToken = jar.get(sessionCookieName(secure))?.value;
  if (previousToken) await endSession({ db, token: previousToken });
  jar.set(sessionCookieName(secure), result.token, sessionCookieOptions(secure, times.maxDays * 86_400));
  redirect(result.mustChangePassword ? `/account/password?next=${encodeURIComponent(next)}` : next);
});

/** Ends the session on the server and clears the cookie. It answers no state (it always redirects), so a plain form can post it. */
export const signOutAction: () => Promise<void> = publicAction<never>({}, async ({ db }) => {
  const h = await headers();
  const jar = await cookies();
  const name = sessionCookieName(secureCookies(h));
  const token = jar.get(name)?.value;
  if (token) {
    const ended = await endSession({ db, token });
    if (ended) {
      const person = await getPersonById({ db, personId: ended.personId });
      await writeAudit({ db, actor: { personId: ended.personId, label: person?.email ?? `person ${ended.personId}`, ip: clientIp(h) }, action: 'sign-out' });
    }
  }
  jar.delete(name);
  redirect('/sign-in?signed-out=1');
});
