'use server';
/**
 * The admin screens' writes: people, their API tokens and display links.
 * Each is an administrator's only, checked here by the action wrapper (the
 * proxy checks the path too, but an action must not rely on that).
 */
import { headers } from 'next/headers';
import { redirect } from 'next/navigation';
import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import { createApiToken, revokeApiToken } from '@/lib/auth/api-tokens';
import { actorOfViewer, type Actor } from '@/lib/auth/audit';
import { createDisplayLink, revokeDisplayLink } from '@/lib/auth/display-links';
import { addPerson, getPersonById, setPassword, setPersonDisabled, updatePersonAccess } from '@/lib/auth/people';
import { clientIp } from '@/lib/auth/request';
import { canAdminPeople, type Viewer } from '@/lib/auth/viewer';
import { SLUG } from '@/lib/contract/nameplate';
import { roleSchema, type Role } from '@/lib/contract/roles';
import { action, type ActionState, type Parsed } from '@/lib/request/action';

/** An admin form's state: with a token or link shown this once (it is stored only hashed). */
export interface AdminState extends ActionState {
  secret?: string;
}

const ADMIN = { allow: canAdminPeople, refused: 'Only an administrator may do this.' } as const;
const id = z.coerce.number().int().positive();
const personBound = z.tuple([id]);

async function actorOf(viewer: Viewer): Promise<Actor> {
  return actorOfViewer(viewer, clientIp(await headers()));
}

function sitesOf(data: FormData): string[] {
  return data
    .getAll('siteIds')
    .map(String)
    .filter((s) => SLUG.test(s));
}

interface NewPersonForm {
  email: string;
  role: Role;
  password: string;
  siteIds: string[];
}

/** Passed on as typed: addPerson checks every field (the role too) and answers all the problems at once, by field. */
function newPersonOf(values: Record<string, string>, _bound: [], data: FormData): Parsed<NewPersonForm> {
  return { ok: true, value: { email: values.email ?? '', role: (values.role ?? '') as Role, password: values.password ?? '', siteIds: sitesOf(data) } };
}

function accessOf(values: Record<string, string>, _bound: [number], data: FormData): Parsed<{ role: Role; siteIds: string[] }> {
  const role = roleSchema.safeParse(values.role);
  return role.success ? { ok: true, value: { role: role.data, siteIds: sitesOf(data) } } : { ok: false, fieldErrors: { role: 'Choose a role.' } };
}

/** A display link shows the fleet or one site. */
function displayLinkOf(values: Record<string, string>): Parsed<{ siteId: string | undefined; name: string }> {
  const scope = values.scope ?? '';
  const siteId = scope === 'fleet' ? undefined : scope;
  if (siteId !== undefined && !SLUG.test(siteId)) return { ok: false, fieldErrors: { scope: 'Choose the fleet or a site.' } };
  return { ok: true, value: { siteId, name: values.name ?? '' } };
}

const TOKEN_NAME_NEEDED = 'Name the token after what will use it, e.g. "energy report script".';
const tokenForm = z.object({ name: z.string({ error: TOKEN_NAME_NEEDED }).trim().min(1, TOKEN_NAME_NEEDED) });
// Never refused here, so the password typed is not sent back with problems: setPassword checks it.
const passwordForm = z.object({ password: z.string().catch('') });

export const addPersonAction = action({ ...ADMIN, input: newPersonOf }, async ({ db, viewer, input, submitted }): Promise<AdminState> => {
  const result = await addPerson({ db, actor: await actorOf(viewer), person: { ...input, mustChangePassword: true } });
  // Typed values come back to fill the form again; the password never does.
  if (!result.ok) return { submitted, values: { email: input.email, role: input.role }, fieldErrors: result.fieldErrors };
  redirect(`/admin/people/${result.person.id}?saved=added`);
});

export const updateAccessAction = action({ ...ADMIN, bound: personBound, input: accessOf }, async ({ db, viewer, input, bound: [personId], submitted }): Promise<AdminState> => {
  const result = await updatePersonAccess({ db, actor: await actorOf(viewer), personId, role: input.role, siteIds: input.siteIds });
  if (!result.ok) return { submitted, fieldErrors: result.fieldErrors };
  revalidatePath('/admin', 'layout');
  return { submitted, done: 'Role and sites saved.' };
});

export const setDisabledAction = action({ ...ADMIN, bound: z.tuple([id, z.boolean()]) }, async ({ db, viewer, bound: [personId, disabled], submitted }): Promise<AdminState> => {
  const result = await setPersonDisabled({ db, actor: await actorOf(viewer), personId, disabled });
  if (!result.ok) return { submitted, error: result.problem };
  revalidatePath('/admin', 'layout');
  return { submitted, done: disabled ? 'Disabled: their sessions have ended and their tokens no longer work.' : 'Enabled: they can sign in again.' };
});

export const resetPasswordAction = action({ ...ADMIN, bound: personBound, input: passwordForm }, async ({ db, viewer, input, bound: [personId], submitted }): Promise<AdminState> => {
  const result = await setPassword({ db, actor: await actorOf(viewer), personId, password: input.password, reset: true });
  if (!result.ok) return { submitted, fieldErrors: { password: result.problem } };
  revalidatePath('/admin', 'layout');
  return { submitted, done: 'Password set. Give it to them in person or by phone; they choose their own at the next sign-in. Their sessions have ended.' };
});

export const createTokenAction = action({ ...ADMIN, bound: personBound, input: tokenForm }, async ({ db, viewer, input, bound: [personId], submitted }): Promise<AdminState> => {
  const person = await getPersonById({ db, personId });
  if (!person) return { submitted, error: 'No such person.' };
  revalidatePath('/admin', 'layout');
  const { token } = await createApiToken({ db, actor: await actorOf(viewer), person, name: input.name });
  return { submitted, done: `Token "${input.name.slice(0, 100)}" made. Copy it now: it is shown this once.`, secret: token };
});

export const revokeTokenAction = action({ ...ADMIN, bound: z.tuple([id, id]) }, async ({ db, viewer, bound: [personId, tokenId], submitted }): Promise<AdminState> => {
  const done = await revokeApiToken({ db, actor: await actorOf(viewer), personId, tokenId });
  revalidatePath('/admin', 'layout');
  return done ? { submitted, done: 'Token revoked: it no longer works.' } : { submitted, error: 'That token was revoked already.' };
});

export const createDisplayLinkAction = action(
  // A display link is recorded as made by a person: an administrator signed in as someone.
  { ...ADMIN, allow: (viewer: Viewer) => canAdminPeople(viewer) && viewer.personId !== undefined, bound: personBound, input: displayLinkOf },
  async ({ db, viewer, input, bound: [personId], submitted }): Promise<AdminState> => {
    const made = await createDisplayLink({ db, actor: await actorOf(viewer), createdBy: personId, siteId: input.siteId, name: input.name });
    if (!made.ok) return { submitted, fieldErrors: { scope: made.problem } };
    revalidatePath('/admin', 'layout');
    const h = await headers();
    const origin = `${h.get('x-forwarded-proto')?.split(',')[0]?.trim() ?? 'http'}://${h.get('host') ?? 'localhost'}`;
    return { submitted, done: 'Display link made. Open it on the wall screen; it is shown this once.', secret: `${origin}/display/${made.token}` };
  },
);

export const revokeDisplayLinkAction = action({ ...ADMIN, bound: z.tuple([id]) }, async ({ db, viewer, bound: [linkId], submitted }): Promise<AdminState> => {
  const done = await revokeDisplayLink({ db, actor: await actorOf(viewer), linkId });
  revalidatePath('/admin', 'layout');
  return done ? { submitted, done: 'Display link revoked: the screen shows nothing from now on.' } : { submitted, error: 'That link was revoked already.' };
});
