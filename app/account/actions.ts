'use server';
/** A signed-in person changes their own password; other sessions of theirs end. */
import { cookies, headers } from 'next/headers';
import { redirect } from 'next/navigation';
import { z } from 'zod';
import { safeNextPath } from '@/lib/auth/access';
import { actorOfViewer } from '@/lib/auth/audit';
import { verifyPassword } from '@/lib/auth/passwords';
import { getPersonByEmail, setPassword } from '@/lib/auth/people';
import { secureCookies, sessionTimes } from '@/lib/auth/request';
import { endSessionsOfPerson, resolveSession, sessionCookieName } from '@/lib/auth/sessions';
import type { Viewer } from '@/lib/auth/viewer';
import { action, type ActionState } from '@/lib/request/action';

/** A person signed in with a session: not an API token, a display link or the local viewer. */
function signedInPerson(viewer: Viewer): boolean {
  return viewer.via === 'session' && viewer.personId !== undefined && Boolean(viewer.email);
}

// Never refused here, so no password typed is sent back: the handler checks them one by one.
const passwordChange = z.object({
  current: z.string().catch(''),
  password: z.string().catch(''),
  again: z.string().catch(''),
  next: z.string().catch('/'),
});

export const changePasswordAction = action(
  { allow: signedInPerson, refused: 'Sign in first: only a signed-in person can change their password.', input: passwordChange },
  async ({ db, viewer, input, submitted }): Promise<ActionState> => {
    const { current, password: fresh, again } = input;
    const person = await getPersonByEmail({ db, email: viewer.email ?? '' });
    if (!person) return { submitted, error: 'Your account is gone; ask an administrator.' };
    if (!(await verifyPassword(current, person.passwordHash))) return { submitted, fieldErrors: { current: 'This is not your current password.' } };
    if (fresh !== again) return { submitted, fieldErrors: { again: 'The two new passwords differ: type the same one twice.' } };
    if (fresh === current) return { submitted, fieldErrors: { password: 'Choose a password different from the current one.' } };
    const saved = await setPassword({ db, actor: actorOfViewer(viewer), personId: person.id, password: fresh, reset: false });
    if (!saved.ok) return { submitted, fieldErrors: { password: saved.problem } };
    const h = await headers();
    const token = (await cookies()).get(sessionCookieName(secureCookies(h)))?.value;
    const mine = token ? await resolveSession({ db, token, times: sessionTimes() }) : undefined;
    await endSessionsOfPerson({ db, personId: person.id, keepSessionId: mine?.session.id });
    redirect(safeNextPath(input.next));
  },
);
