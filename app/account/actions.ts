'use server';
/** A signed-in person changes their own password; other sessions of theirs end. */
import { cookies, headers } from 'next/headers';
import { redirect } from 'next/navigation';
import { getDatabase } from '@/db/client';
import { safeNextPath } from '@/lib/auth/access';
import { actorOfViewer } from '@/lib/auth/audit';
import { verifyPassword } from '@/lib/auth/passwords';
import { getPersonByEmail, setPassword } from '@/lib/auth/people';
import { secureCookies, sessionTimes } from '@/lib/auth/request';
import { endSessionsOfPerson, resolveSession, sessionCookieName } from '@/lib/auth/sessions';
import { currentViewer } from '@/lib/auth/viewer';
import type { FormResult } from '@/app/admin/form-result';

export async function changePasswordAction(previous: FormResult, data: FormData): Promise<FormResult> {
  const submitted = previous.submitted + 1;
  const viewer = await currentViewer();
  if (viewer.via !== 'session' || viewer.personId === undefined || !viewer.email) {
    return { submitted, error: 'Sign in first: only a signed-in person can change their password.' };
  }
  const current = String(data.get('current') ?? '');
  const fresh = String(data.get('password') ?? '');
  const again = String(data.get('again') ?? '');
  const { db } = await getDatabase();
  const person = await getPersonByEmail({ db, email: viewer.email });
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
  redirect(safeNextPath(String(data.get('next') ?? '/')));
}
