/**
 * The person (or display) a query runs for. Every query of `lib/<area>/queries.ts`
 * that returns site data takes a viewer and scopes by site from the start, so
 * that accounts can fill this in without touching the screens.
 *
 * Until accounts exist there is one local viewer that sees every site.
 */
import { z } from 'zod';

export const ROLES = ['admin', 'operator', 'crew', 'owner'] as const;
export type Role = (typeof ROLES)[number];
export const roleSchema = z.enum(ROLES);

/** Who is asking, and which sites they may see. */
export interface Viewer {
  /** Stable id of the person, or 'local' for the single local viewer. */
  readonly id: string;
  readonly role: Role;
  /** Sites the viewer may see: 'all', or the ids of their sites. */
  readonly siteIds: 'all' | readonly string[];
}

/** The one viewer of a product without accounts: sees and may change everything. */
export const LOCAL_VIEWER: Viewer = Object.freeze({ id: 'local', role: 'admin', siteIds: 'all' });

/**
 * Whether the viewer may see the site.
 * @example canSeeSite(LOCAL_VIEWER, 'thrennow-isk') // true
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
  return viewer.role === 'admin' || viewer.role === 'operator';
}

/**
 * The viewer of the current request. Accounts will read the session here;
 * until then every request is the local viewer.
 */
export async function currentViewer(): Promise<Viewer> {
  return LOCAL_VIEWER;
}
