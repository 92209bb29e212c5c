/**
 * People: add, list, change role and sites, disable, reset and change
 * passwords. Every change writes the audit log. Disabling a person ends all
 * their sessions (and their API tokens stop working while disabled).
 */
import { and, asc, eq, inArray, sql } from 'drizzle-orm';
import { z } from 'zod';
import type { Db } from '@/db/client';
import { people, personSites, sessions, sites, type PersonRow } from '@/db/schema';
import { AppError } from '@/lib/errors/app-error';
import { writeAudit, type Actor } from './audit';
import { hashPassword, passwordProblem } from './passwords';
import { SITE_BOUND_ROLES, roleSchema, type Role } from '@/lib/contract/roles';
import type { Viewer } from './viewer';

/** An e-mail address as people type it: trimmed, at most 254 characters, one @ with something either side. */
export const emailSchema = z
  .string({ error: 'required' })
  .trim()
  .min(3, 'required')
  .max(254, 'must be at most 254 characters')
  .regex(/^[^\s@]+@[^\s@]+$/, 'must be an e-mail address such as ana@example.org');

export interface NewPerson {
  email: string;
  role: Role;
  password: string;
  siteIds?: readonly string[];
  mustChangePassword?: boolean;
}

/** Problems of a new person by field (email, role, password, siteIds), or the person as stored. */
export type AddPersonResult = { ok: true; person: PersonRow } | { ok: false; fieldErrors: Record<string, string> };

/** The people list of the admin screen. */
export interface PersonSummary {
  id: number;
  email: string;
  role: Role;
  disabled: boolean;
  mustChangePassword: boolean;
  siteIds: string[];
  createdAt: Date;
}

/** The person with that e-mail address (any case), or undefined. */
export async function getPersonByEmail({ db, email }: { db: Db; email: string }): Promise<PersonRow | undefined> {
  const [row] = await db
    .select()
    .from(people)
    .where(sql`lower(${people.email}) = ${email.trim().toLowerCase()}`)
    .limit(1);
  return row;
}

export async function getPersonById({ db, personId }: { db: Db; personId: number }): Promise<PersonSummary | undefined> {
  const [row] = await db.select().from(people).where(eq(people.id, personId)).limit(1);
  if (!row) return undefined;
  const siteRows = await db.select({ siteId: personSites.siteId }).from(personSites).where(eq(personSites.personId, personId)).orderBy(asc(personSites.siteId));
  return summary(row, siteRows.map((s) => s.siteId));
}

function summary(row: PersonRow, siteIds: string[]): PersonSummary {
  return { id: row.id, email: row.email, role: row.role, disabled: row.disabled, mustChangePassword: row.mustChangePassword, siteIds, createdAt: row.createdAt };
}

/** Everyone, by e-mail address. */
export async function getPeople({ db }: { db: Db }): Promise<PersonSummary[]> {
  const rows = await db.select().from(people).orderBy(asc(sql`lower(${people.email})`));
  const links = await db.select().from(personSites).orderBy(asc(personSites.siteId));
  return rows.map((r) => summary(r, links.filter((l) => l.personId === r.id).map((l) => l.siteId)));
}

/** Whether anyone has an account yet. */
export async function hasPeople({ db }: { db: Db }): Promise<boolean> {
  const [row] = await db.select({ id: people.id }).from(people).limit(1);
  return row !== undefined;
}

/** The sites of a crew member or owner, or 'all' for admins and operators. */
export async function siteIdsOfPerson({ db, person }: { db: Db; person: Pick<PersonRow, 'id' | 'role'> }): Promise<'all' | string[]> {
  if (!SITE_BOUND_ROLES.includes(person.role)) return 'all';
  const rows = await db.select({ siteId: personSites.siteId }).from(personSites).where(eq(personSites.personId, person.id));
  return rows.map((r) => r.siteId);
}

/** The viewer a signed-in person is. */
export async function viewerOfPerson({ db, person, via, ip }: { db: Db; person: PersonRow; via: 'session' | 'token'; ip?: string }): Promise<Viewer> {
  return {
    id: `person:${person.id}`,
    personId: person.id,
    email: person.email,
    role: person.role,
    siteIds: await siteIdsOfPerson({ db, person }),
    via,
    ...(ip ? { ip } : {}),
    ...(person.mustChangePassword ? { mustChangePassword: true } : {}),
  };
}

async function checkSites(db: Db, role: Role, siteIds: readonly string[]): Promise<string | undefined> {
  if (!SITE_BOUND_ROLES.includes(role)) return siteIds.length ? `an ${role} sees every site: leave the sites empty` : undefined;
  if (siteIds.length === 0) return `a ${role} sees only their sites: choose at least one`;
  const found = await db.select({ id: sites.id }).from(sites).where(inArray(sites.id, [...siteIds]));
  const missing = siteIds.filter((s) => !found.some((f) => f.id === s));
  return missing.length ? `no site ${missing.map((m) => `"${m}"`).join(', ')}` : undefined;
}

/** Adds a person; the password is checked against the rules and stored hashed. */
export async function addPerson({ db, actor, person }: { db: Db; actor: Actor; person: NewPerson }): Promise<AddPersonResult> {
  const fieldErrors: Record<string, string> = {};
  const email = emailSchema.safeParse(person.email);
  if (!email.success) fieldErrors.email = email.error.issues[0]!.message;
  const role = roleSchema.safeParse(person.role);
  if (!role.success) fieldErrors.role = role.error.issues[0]!.message;
  const problem = passwordProblem(person.password, { email: person.email });
  if (problem) fieldErrors.password = problem;
  const siteIds = [...new Set(person.siteIds ?? [])];
  if (role.success) {
    const siteProblem = await checkSites(db, role.data, siteIds);
    if (siteProblem) fieldErrors.siteIds = siteProblem;
  }
  if (email.success && (await getPersonByEmail({ db, email: email.data }))) fieldErrors.email = `someone has the address ${email.data} already`;
  if (Object.keys(fieldErrors).length || !email.success || !role.success) return { ok: false, fieldErrors };
  const passwordHash = await hashPassword(person.password);
  const row = await db.transaction(async (tx) => {
    const [inserted] = await tx
      .insert(people)
      .values({ email: email.data, role: role.data, passwordHash, mustChangePassword: person.mustChangePassword ?? false })
      .returning();
    if (siteIds.length) await tx.insert(personSites).values(siteIds.map((siteId) => ({ personId: inserted!.id, siteId })));
    return inserted!;
  });
  await writeAudit({ db, actor, action: 'person-added', target: `person ${row.email}`, detail: { role: row.role, siteIds } });
  return { ok: true, person: row };
}

/** Changes a person's role and sites. */
export async function updatePersonAccess({ db, actor, personId, role, siteIds }: { db: Db; actor: Actor; personId: number; role: Role; siteIds: readonly string[] }): Promise<{ ok: true } | { ok: false; fieldErrors: Record<string, string> }> {
  const before = await getPersonById({ db, personId });
  if (!before) throw new AppError('not-found', 'people', 'no such person');
  const unique = [...new Set(siteIds)];
  const problem = await checkSites(db, role, unique);
  if (problem) return { ok: false, fieldErrors: { siteIds: problem } };
  if (before.role === 'admin' && role !== 'admin' && !before.disabled && (await countActiveAdmins(db)) <= 1) {
    return { ok: false, fieldErrors: { role: 'this is the last administrator who can sign in: make someone else an administrator first' } };
  }
  await db.transaction(async (tx) => {
    await tx.update(people).set({ role, updatedAt: new Date() }).where(eq(people.id, personId));
    await tx.delete(personSites).where(eq(personSites.personId, personId));
    if (unique.length) await tx.insert(personSites).values(unique.map((siteId) => ({ personId, siteId })));
  });
  await writeAudit({ db, actor, action: 'person-changed', target: `person ${before.email}`, detail: { before: { role: before.role, siteIds: before.siteIds }, after: { role, siteIds: unique } } });
  return { ok: true };
}

async function countActiveAdmins(db: Db): Promise<number> {
  const rows = await db.select({ id: people.id }).from(people).where(and(eq(people.role, 'admin'), eq(people.disabled, false)));
  return rows.length;
}

/** Disables or enables a person. Disabling ends all their sessions at once. The last enabled admin cannot be disabled. */
export async function setPersonDisabled({ db, actor, personId, disabled }: { db: Db; actor: Actor; personId: number; disabled: boolean }): Promise<{ ok: true } | { ok: false; problem: string }> {
  const person = await getPersonById({ db, personId });
  if (!person) throw new AppError('not-found', 'people', 'no such person');
  if (disabled && person.role === 'admin' && !person.disabled && (await countActiveAdmins(db)) <= 1) {
    return { ok: false, problem: 'this is the last administrator who can sign in: make someone else an administrator first' };
  }
  await db.transaction(async (tx) => {
    await tx.update(people).set({ disabled, updatedAt: new Date() }).where(eq(people.id, personId));
    if (disabled) await tx.delete(sessions).where(eq(sessions.personId, personId));
  });
  await writeAudit({ db, actor, action: disabled ? 'person-disabled' : 'person-enabled', target: `person ${person.email}` });
  return { ok: true };
}

/**
 * Sets a new password. By an admin (`reset`): the person must change it at
 * their next sign-in and all their sessions end. By the person: the flag clears.
 */
export async function setPassword({ db, actor, personId, password, reset }: { db: Db; actor: Actor; personId: number; password: string; reset: boolean }): Promise<{ ok: true } | { ok: false; problem: string }> {
  const person = await getPersonById({ db, personId });
  if (!person) throw new AppError('not-found', 'people', 'no such person');
  const problem = passwordProblem(password, { email: person.email });
  if (problem) return { ok: false, problem: `The password ${problem}.` };
  const passwordHash = await hashPassword(password);
  await db.transaction(async (tx) => {
    await tx.update(people).set({ passwordHash, mustChangePassword: reset, updatedAt: new Date() }).where(eq(people.id, personId));
    if (reset) await tx.delete(sessions).where(eq(sessions.personId, personId));
  });
  await writeAudit({ db, actor, action: reset ? 'password-reset' : 'password-changed', target: `person ${person.email}` });
  return { ok: true };
}
