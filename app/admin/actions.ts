'use server';
/**
 * The admin screens' writes: people, their API tokens and display links.
 * Each checks on the server that the caller is an admin (the proxy checks
 * the path too, but an action must not rely on that).
 */
import { headers } from 'next/headers';
import { redirect } from 'next/navigation';
import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import { getDatabase } from '@/db/client';
import { createApiToken, revokeApiToken } from '@/lib/auth/api-tokens';
import { actorOfViewer } from '@/lib/auth/audit';
import { createDisplayLink, revokeDisplayLink } from '@/lib/auth/display-links';
import { addPerson, getPersonById, setPassword, setPersonDisabled, updatePersonAccess } from '@/lib/auth/people';
import { clientIp } from '@/lib/auth/request';
import { roleSchema } from '@/lib/contract/roles';
import { canAdminPeople, currentViewer, type Viewer } from '@/lib/auth/viewer';
import { SLUG } from '@/lib/contract/nameplate';
import type { FormResult } from './form-result';

const NOT_ADMIN = 'Only an administrator may do this.';
const idSchema = z.coerce.number().int().positive();

async function admin(): Promise<{ viewer: Viewer; ip: string } | undefined> {
  const viewer = await currentViewer();
  if (!canAdminPeople(viewer)) return undefined;
  return { viewer, ip: clientIp(await headers()) };
}

function sitesOf(data: FormData): string[] {
  return data
    .getAll('siteIds')
    .map(String)
    .filter((s) => SLUG.test(s));
}

export async function addPersonAction(previous: FormResult, data: FormData): Promise<FormResult> {
  const submitted = previous.submitted + 1;
  const me = await admin();
  if (!me) return { submitted, error: NOT_ADMIN };
  const values = { email: String(data.get('email') ?? ''), role: String(data.get('role') ?? '') };
  const { db } = await getDatabase();
  const result = await addPerson({
    db,
    actor: actorOfViewer(me.viewer, me.ip),
    person: { email: values.email, role: values.role as never, password: String(data.get('password') ?? ''), siteIds: sitesOf(data), mustChangePassword: true },
  });
  if (!result.ok) return { submitted, values, fieldErrors: result.fieldErrors };
  redirect(`/admin/people/${result.person.id}?saved=added`);
}

export async function updateAccessAction(personId: number, previous: FormResult, data: FormData): Promise<FormResult> {
  const submitted = previous.submitted + 1;
  const me = await admin();
  if (!me) return { submitted, error: NOT_ADMIN };
  const role = roleSchema.safeParse(data.get('role'));
  if (!role.success) return { submitted, fieldErrors: { role: 'Choose a role.' } };
  const { db } = await getDatabase();
  const result = await updatePersonAccess({ db, actor: actorOfViewer(me.viewer, me.ip), personId: idSchema.parse(personId), role: role.data, siteIds: sitesOf(data) });
  if (!result.ok) return { submitted, fieldErrors: result.fieldErrors };
  revalidatePath('/admin', 'layout');
  return { submitted, done: 'Role and sites saved.' };
}

export async function setDisabledAction(personId: number, disabled: boolean, previous: FormResult): Promise<FormResult> {
  const submitted = previous.submitted + 1;
  const me = await admin();
  if (!me) return { submitted, error: NOT_ADMIN };
  const { db } = await getDatabase();
  const result = await setPersonDisabled({ db, actor: actorOfViewer(me.viewer, me.ip), personId: idSchema.parse(personId), disabled: disabled === true });
  if (!result.ok) return { submitted, error: result.problem };
  revalidatePath('/admin', 'layout');
  return { submitted, done: disabled ? 'Disabled: their sessions have ended and their tokens no longer work.' : 'Enabled: they can sign in again.' };
}

export async function resetPasswordAction(personId: number, previous: FormResult, data: FormData): Promise<FormResult> {
  const submitted = previous.submitted + 1;
  const me = await admin();
  if (!me) return { submitted, error: NOT_ADMIN };
  const { db } = await getDatabase();
  const result = await setPassword({ db, actor: actorOfViewer(me.viewer, me.ip), personId: idSchema.parse(personId), password: String(data.get('password') ?? ''), reset: true });
  if (!result.ok) return { submitted, fieldErrors: { password: result.problem } };
  revalidatePath('/admin', 'layout');
  return { submitted, done: 'Password set. Give it to them in person or by phone; they choose their own at the next sign-in. Their sessions have ended.' };
}

export async function createTokenAction(personId: number, previous: FormResult, data: FormData): Promise<FormResult> {
  const submitted = previous.submitted + 1;
  const me = await admin();
  if (!me) return { submitted, error: NOT_ADMIN };
  const { db } = await getDatabase();
  const person = await getPersonById({ db, personId: idSchema.parse(personId) });
  if (!person) return { submitted, error: 'No such person.' };
  const name = String(data.get('name') ?? '').trim();
  if (!name) return { submitted, fieldErrors: { name: 'Name the token after what will use it, e.g. "energy report script".' } };
  revalidatePath('/admin', 'layout');
  const { token } = await createApiToken({ db, actor: actorOfViewer(me.viewer, me.ip), person, name });
  return { submitted, done: `Token "${name.slice(0, 100)}" made. Copy it now: it is shown this once.`, secret: token };
}

export async function revokeTokenAction(personId: number, tokenId: number, previous: FormResult): Promise<FormResult> {
  const submitted = previous.submitted + 1;
  const me = await admin();
  if (!me) return { submitted, error: NOT_ADMIN };
  const { db } = await getDatabase();
  const done = await revokeApiToken({ db, actor: actorOfViewer(me.viewer, me.ip), personId: idSchema.parse(personId), tokenId: idSchema.parse(tokenId) });
  revalidatePath('/admin', 'layout');
  return done ? { submitted, done: 'Token revoked: it no longer works.' } : { submitted, error: 'That token was revoked already.' };
}

export async function createDisplayLinkAction(personId: number, previous: FormResult, data: FormData): Promise<FormResult> {
  const submitted = previous.submitted + 1;
  const me = await admin();
  if (!me || me.viewer.personId === undefined) return { submitted, error: NOT_ADMIN };
  const scope = String(data.get('scope') ?? '');
  const siteId = scope === 'fleet' ? undefined : scope;
  if (siteId !== undefined && !SLUG.test(siteId)) return { submitted, fieldErrors: { scope: 'Choose the fleet or a site.' } };
  const { db } = await getDatabase();
  const made = await createDisplayLink({ db, actor: actorOfViewer(me.viewer, me.ip), createdBy: idSchema.parse(personId), siteId, name: String(data.get('name') ?? '') });
  if (!made.ok) return { submitted, fieldErrors: { scope: made.problem } };
  revalidatePath('/admin', 'layout');
  const h = await headers();
  const origin = `${h.get('x-forwarded-proto')?.split(',')[0]?.trim() ?? 'http'}://${h.get('host') ?? 'localhost'}`;
  return { submitted, done: 'Display link made. Open it on the wall screen; it is shown this once.', secret: `${origin}/display/${made.token}` };
}

export async function revokeDisplayLinkAction(linkId: number, previous: FormResult): Promise<FormResult> {
  const submitted = previous.submitted + 1;
  const me = await admin();
  if (!me) return { submitted, error: NOT_ADMIN };
  const { db } = await getDatabase();
  const done = await revokeDisplayLink({ db, actor: actorOfViewer(me.viewer, me.ip), linkId: idSchema.parse(linkId) });
  revalidatePath('/admin', 'layout');
  return done ? { submitted, done: 'Display link revoked: the screen shows nothing from now on.' } : { submitted, error: 'That link was revoked already.' };
}
