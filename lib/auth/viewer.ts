/**
 * The person (or display) a query runs for. Every query of `lib/<area>/queries.ts`
 * that returns site data takes a viewer and scopes by site from the start.
 *
 * `currentViewer()` reads the request: a session cookie, an
 * `Authorization: Bearer` API token (lib/auth/request.ts). Who may do what:
 * admin everything, people included; operator all sites, edits setup,
 * acknowledges; crew their sites, acknowledges; owner their sites, read only.
 */
import type { Role } from '@/lib/contract/roles';

/** Who is asking, and which sites they may see. */
export interface Viewer {
  /** Stable id: `person:<id>`, `display:<id>`, or 'local' for the local viewer of tests and tools. */
  readonly id: string;
  readonly role: Role;
  /** Sites the viewer may see: 'all', or the ids of their sites. */
  readonly siteIds: 'all' | readonly string[];
  /** The person behind it (undefined for the local viewer and display links). */
  readonly personId?: number;
  readonly email?: string;
  /** How the request proved who it is. */
  readonly via?: 'local' | 'session' | 'token' | 'display';
  /** The address the request came from, for the audit log. */
  readonly ip?: string;
  /** The person's password was set by someone else: they must choose their own before anything else. */
  readonly mustChangePassword?: boolean;
}

/** The viewer of tests, benches and command-line tools: sees and may change everything. */
export const LOCAL_VIEWER: Viewer = Object.freeze({ id: 'local', role: 'admin', siteIds: 'all', via: 'local' });

/**
 * Whether the viewer may see the site.
 * @example canSeeSite(LOCAL_VIEWER, 'north-ridge') // true
 */
export function canSeeSite(viewer: Viewer, siteId: string): boolean {
  return viewer.siteIds === 'all' || viewer.siteIds.includes(siteId);
}

/**
 * The site ids a query must be limited to, or undefined when the viewer sees all.
 * An empty array means the viewer sees none (the query must return nothing).
 */
export function siteFilter(viewer: Viewer): readonly string[] | undefined {
  return viewer.siteIds === 'all' ? undefined : viewer.siteIds;
}

/** Whether the viewer may change setup (sites, units, limits). */
export function canEditSetup(viewer: Viewer): boolean {
  return viewer.via !== 'display' && (viewer.role === 'admin' || viewer.role === 'operator');
}

/** Whether the viewer may add people, reset passwords, issue tokens and display links, and read the audit log. */
export function canAdminPeople(viewer: Viewer): boolean {
  return viewer.via !== 'display' && viewer.role === 'admin';
}

/** Whether the viewer may acknowledge alerts (of the sites they see). */
export function canAcknowledge(viewer: Viewer): boolean {
  return viewer.via !== 'display' && viewer.role !== 'owner';
}

/** Whether the viewer is a signed-in person (not a display link, not the local viewer). */
export function isPerson(viewer: Viewer): boolean {
  return viewer.personId !== undefined && (viewer.via === 'session' || viewer.via === 'token');
}

/**
 * The viewer of the current request (a page, route handler or server action).
 * Nobody signed in: on a page or action, a redirect to /sign-in?next=…; in a
 * route under /api, an AppError `unauthenticated:auth` (401). A disabled
 * person, an ended or expired session, a revoked token count as nobody.
 */
export async function currentViewer(): Promise<Viewer> {
  const { viewerOfRequest } = await import('./request');
  return viewerOfRequest();
}
