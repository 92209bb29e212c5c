/**
 * The people screens (the list, one person, the audit log), the password page
 * and the sign-in page, each read in one call as a plain view model: texts
 * chosen, times written out, cursors made. Who may see a screen is decided
 * here: a page only turns 'forbidden' or 'not-found' into Next's answer.
 */
import { z } from 'zod';
import type { Db } from '@/db/client';
import { getApiTokensOfPerson } from '@/lib/auth/api-tokens';
import { AUDIT_ACTIONS, getAuditPage } from '@/lib/auth/audit';
import { safeNextPath } from '@/lib/auth/access';
import { DEMO_ADMIN_EMAIL } from '@/lib/auth/demo-admin';
import { getDisplayLinksByCreator } from '@/lib/auth/display-links';
import { getPeople, getPersonById } from '@/lib/auth/people';
import { canAdminPeople, type Viewer } from '@/lib/auth/viewer';
import { getConfig } from '@/lib/config/env';
import { ROLES, SITE_BOUND_ROLES, type Role } from '@/lib/contract/roles';
import { requestContext } from '@/lib/request/context';
import { getSetupSites } from '@/lib/setup/queries';

/** What a page answers instead of a screen: Next's 403 or 404. */
export type Refusal = 'forbidden' | 'not-found';

/** A page's search parameters as Next hands them over. */
export type SearchParams = Record<string, string | string[] | undefined>;

/** A moment as a `<time>` shows it; undefined reads "never". */
export interface When {
  readonly dateTime: string;
  readonly text: string;
}

/** A site a person may be given, or a display link may show. */
export interface SiteChoice {
  readonly id: string;
  readonly name: string;
}

/** The roles in words, in the order the role menu lists them. */
export const ROLE_NAMES: Readonly<Record<Role, string>> = { admin: 'Administrator', operator: 'Operator', crew: 'Crew', owner: 'Owner' };

/** A role in the role menu. */
export interface RoleChoice {
  readonly value: Role;
  readonly name: string;
}

/** The role menu's choices. */
export const ROLE_CHOICES: readonly RoleChoice[] = ROLES.map((value) => ({ value, name: ROLE_NAMES[value] }));

/** UTC, to the minute (`precision` 16) or the second (19): "2026-03-01 08:00 UTC". */
export function whenOf(at: Date, precision: 16 | 19 = 16): When {
  const dateTime = at.toISOString();
  return { dateTime, text: `${dateTime.slice(0, precision).replace('T', ' ')} UTC` };
}

/** A search parameter given once, or undefined (absent, empty, or given twice). */
function single(value: string | string[] | undefined): string | undefined {
  return typeof value === 'string' && value !== '' ? value : undefined;
}

async function siteChoicesOf(db: Db, viewer: Viewer): Promise<SiteChoice[]> {
  return (await getSetupSites({ db, viewer })).map((s) => ({ id: s.id, name: s.name }));
}

// ---------------------------------------------------------------- the people list

/** One person in the people list. */
export interface PeopleRow {
  readonly id: number;
  readonly email: string;
  readonly href: string;
  readonly roleName: string;
  /** "all" for roles that see every site, else the ids or "none". */
  readonly sites: string;
  readonly disabled: boolean;
  /** Must choose their own password (said only of someone who can sign in). */
  readonly mustChoosePassword: boolean;
}

/** /admin/people: everyone, and what the form to add a person offers. */
export interface PeopleScreen {
  readonly caption: string;
  readonly roles: readonly RoleChoice[];
  readonly people: readonly PeopleRow[];
  readonly sites: readonly SiteChoice[];
}

/** The people list for the request's viewer, or 'forbidden' for anyone but an administrator. */
export async function loadPeopleScreen(): Promise<PeopleScreen | 'forbidden'> {
  const { db, viewer, nowMs } = await requestContext();
  return readPeopleScreen({ db, viewer, nowMs });
}

/** Everyone who has an account, with their role and sites in words, and the sites to give a new person. */
export async function readPeopleScreen({ db, viewer }: { db: Db; viewer: Viewer; nowMs: number }): Promise<PeopleScreen | 'forbidden'> {
  if (!canAdminPeople(viewer)) return 'forbidden';
  const [people, sites] = await Promise.all([getPeople({ db }), siteChoicesOf(db, viewer)]);
  const caption = people.length === 0 ? 'Nobody has an account yet: add the first person below.' : `${people.length} ${people.length === 1 ? 'person' : 'people'}`;
  const rows = people.map((p) => ({
    id: p.id,
    email: p.email,
    href: `/admin/people/${p.id}`,
    roleName: ROLE_NAMES[p.role],
    sites: SITE_BOUND_ROLES.includes(p.role) ? p.siteIds.join(', ') || 'none' : 'all',
    disabled: p.disabled,
    mustChoosePassword: p.mustChangePassword && !p.disabled,
  }));
  return { caption, roles: ROLE_CHOICES, people: rows, sites };
}

// ---------------------------------------------------------------- one person

/** An API token as the person page lists it (never the token itself). */
export interface PersonToken {
  readonly id: number;
  readonly name: string;
  readonly made: When;
  readonly lastUsed: When | undefined;
  readonly revoked: boolean;
}

/** A display link as the person page lists it (never the link itself). */
export interface PersonDisplayLink {
  readonly id: number;
  readonly name: string;
  /** The site it shows, or undefined for the fleet. */
  readonly siteId: string | undefined;
  readonly lastUsed: When | undefined;
  readonly revoked: boolean;
}

/** /admin/people/[personId]: the person, their credentials, and the choices of its forms. */
export interface PersonScreen {
  readonly person: { readonly id: number; readonly email: string; readonly role: Role; readonly siteIds: readonly string[]; readonly disabled: boolean; readonly mustChangePassword: boolean };
  /** Said once, just after the person was added. */
  readonly notice: string | undefined;
  readonly roles: readonly RoleChoice[];
  readonly sites: readonly SiteChoice[];
  readonly tokens: readonly PersonToken[];
  readonly links: readonly PersonDisplayLink[];
  /** What a new display link may show; undefined when this person may not make one (only administrators do). */
  readonly linkScopes: readonly { readonly value: string; readonly label: string }[] | undefined;
}

const personIdSchema = z
  .string()
  .regex(/^[1-9][0-9]{0,15}$/)
  .transform(Number);

/** One person's page: 'forbidden' for anyone but an administrator, 'not-found' for an id nobody has. */
export async function loadPersonScreen({ personId, searchParams }: { personId: string; searchParams: SearchParams }): Promise<PersonScreen | Refusal> {
  const { db, viewer, nowMs } = await requestContext();
  return readPersonScreen({ db, viewer, nowMs, personId, searchParams });
}

/** The person, their API tokens and the display links they made, with the choices of the forms. */
export async function readPersonScreen({
  db,
  viewer,
  personId: raw,
  searchParams,
}: {
  db: Db;
  viewer: Viewer;
  nowMs: number;
  personId: string;
  searchParams: SearchParams;
}): Promise<PersonScreen | Refusal> {
  if (!canAdminPeople(viewer)) return 'forbidden';
  const id = personIdSchema.safeParse(raw);
  if (!id.success) return 'not-found';
  const personId = id.data;
  const person = await getPersonById({ db, personId });
  if (!person) return 'not-found';
  const [tokens, links, sites] = await Promise.all([getApiTokensOfPerson({ db, personId }), getDisplayLinksByCreator({ db, personId }), siteChoicesOf(db, viewer)]);
  return {
    person: { id: person.id, email: person.email, role: person.role, siteIds: person.siteIds, disabled: person.disabled, mustChangePassword: person.mustChangePassword },
    notice:
      searchParams.saved === 'added' ? 'Added. Give them their first password in person or by phone; they choose their own at their first sign-in.' : undefined,
    roles: ROLE_CHOICES,
    sites,
    tokens: tokens.map((t) => ({ id: t.id, name: t.name, made: whenOf(t.createdAt), lastUsed: t.lastUsedAt ? whenOf(t.lastUsedAt) : undefined, revoked: t.revokedAt !== null })),
    links: links.map((l) => ({ id: l.id, name: l.name, siteId: l.siteId ?? undefined, lastUsed: l.lastUsedAt ? whenOf(l.lastUsedAt) : undefined, revoked: l.revokedAt !== null })),
    linkScopes: person.role === 'admin' ? [{ value: 'fleet', label: 'The whole fleet' }, ...sites.map((s) => ({ value: s.id, label: `Site ${s.name}` }))] : undefined,
  };
}

// ---------------------------------------------------------------- the audit log

/** One entry of the audit log, written out. */
export interface AuditEntry {
  readonly id: number;
  readonly action: string;
  readonly target: string | undefined;
  readonly at: When;
  readonly actor: string;
  readonly ip: string;
  /** What changed, as indented JSON; undefined when nothing is recorded. */
  readonly detail: string | undefined;
}

/** /admin/audit: one page of the log with its filter and the links to page on. */
export interface AuditScreen {
  /** The filter as chosen ('' for any), for the form's menus. */
  readonly person: string;
  readonly action: string;
  readonly filtered: boolean;
  readonly people: readonly { readonly id: number; readonly email: string }[];
  readonly actions: readonly string[];
  readonly entries: readonly AuditEntry[];
  /** Said when there are no entries. */
  readonly empty: string;
  /** Back to the newest page (shown on an older page). */
  readonly newestHref: string | undefined;
  readonly olderHref: string | undefined;
}

/** `at` ISO + `_` + id of the last entry shown: the next page starts after it. */
const CURSOR = /^\d{4}-\d\d-\d\dT[\d:.]+Z_\d{1,18}$/;

// A parameter that cannot be used is left out, as if not given: these come from the screen's own links and menus.
const auditQuerySchema = z.object({
  person: z.coerce.number().int().positive().optional().catch(undefined),
  action: z.enum(AUDIT_ACTIONS).optional().catch(undefined),
  before: z
    .string()
    .max(64)
    .regex(CURSOR)
    .transform((s) => ({ at: new Date(s.split('_')[0]!), id: Number(s.split('_')[1]) }))
    .refine((c) => Number.isFinite(c.at.getTime()))
    .optional()
    .catch(undefined),
});

/** The cursor of an entry, for the "Older entries" link. */
export function auditCursorOf(at: Date, id: number): string {
  return `${at.toISOString()}_${id}`;
}

/** The audit log for the request's viewer: 'forbidden' for anyone but an administrator. */
export async function loadAuditScreen(searchParams: SearchParams): Promise<AuditScreen | 'forbidden'> {
  const { db, viewer, nowMs } = await requestContext();
  return readAuditScreen({ db, viewer, nowMs, searchParams });
}

/** A page of the log, newest first, filtered by person and action, with the links to the next page and back. */
export async function readAuditScreen({ db, viewer, searchParams }: { db: Db; viewer: Viewer; nowMs: number; searchParams: SearchParams }): Promise<AuditScreen | 'forbidden'> {
  if (!canAdminPeople(viewer)) return 'forbidden';
  const q = auditQuerySchema.parse({ person: single(searchParams.person), action: single(searchParams.action), before: single(searchParams.before) });
  const [page, people] = await Promise.all([getAuditPage({ db, personId: q.person, action: q.action, before: q.before }), getPeople({ db })]);
  const keep = new URLSearchParams();
  if (q.person) keep.set('person', String(q.person));
  if (q.action) keep.set('action', q.action);
  return {
    person: q.person ? String(q.person) : '',
    action: q.action ?? '',
    filtered: Boolean(q.person || q.action),
    people: people.map((p) => ({ id: p.id, email: p.email })),
    actions: AUDIT_ACTIONS,
    entries: page.rows.map((r) => ({
      id: r.id,
      action: r.action,
      target: r.target || undefined,
      at: whenOf(r.at, 19),
      actor: r.actor,
      ip: r.ip ?? 'unknown address',
      detail: Object.keys(r.detail).length ? JSON.stringify(r.detail, null, 1) : undefined,
    })),
    empty: q.before ? 'No older entries.' : 'Nothing in the log matches.',
    newestHref: q.before ? `/admin/audit${keep.size ? `?${keep}` : ''}` : undefined,
    olderHref: page.next ? `/admin/audit?${new URLSearchParams([...keep, ['before', auditCursorOf(page.next.at, page.next.id)]])}` : undefined,
  };
}

// ---------------------------------------------------------------- your password

/** /account/password. */
export interface PasswordScreen {
  /** Signed in with a session: only then can a password be changed here. */
  readonly signedIn: boolean;
  /** Someone else set the current password: the person must choose their own first. */
  readonly mustChange: boolean;
  readonly email: string | undefined;
  /** Where to go once changed (a path of this site). */
  readonly next: string;
}

/** The password page of the request's viewer (nobody signed in is sent to sign in). */
export async function loadPasswordScreen(searchParams: SearchParams): Promise<PasswordScreen> {
  const { viewer } = await requestContext();
  return readPasswordScreen({ viewer, searchParams });
}

/** Whether the viewer can change a password here, and whether they must. */
export function readPasswordScreen({ viewer, searchParams }: { viewer: Viewer; searchParams: SearchParams }): PasswordScreen {
  const raw = searchParams.next;
  return {
    signedIn: viewer.via === 'session',
    mustChange: viewer.mustChangePassword === true,
    email: viewer.email,
    next: safeNextPath(typeof raw === 'string' ? raw : '/'),
  };
}

// ---------------------------------------------------------------- sign-in

/** /sign-in. */
export interface SignInScreen {
  readonly next: string;
  readonly signedOut: boolean;
  /** The demo admin's address, on an embedded demo start only (where the one-time password is printed). */
  readonly demoAdminEmail: string | undefined;
}

/** The sign-in page: open to anyone, so no viewer is resolved (that would send nobody back here). */
export function loadSignInScreen(searchParams: SearchParams): SignInScreen {
  const config = getConfig();
  return readSignInScreen({ searchParams, demo: config.DEMO && !config.DATABASE_URL });
}

/** Where to go after signing in, whether the person just signed out, and the demo's hint. */
export function readSignInScreen({ searchParams, demo }: { searchParams: SearchParams; demo: boolean }): SignInScreen {
  const raw = searchParams.next;
  return { next: safeNextPath(typeof raw === 'string' ? raw : '/'), signedOut: searchParams['signed-out'] === '1', demoAdminEmail: demo ? DEMO_ADMIN_EMAIL : undefined };
}
