/**
 * What a wall screen's display link shows: one site's table or the fleet,
 * read as the link's read-only viewer (lib/auth/display-links.ts).
 */
import { getDatabase } from '@/db/client';
import { resolveDisplayLink } from '@/lib/auth/display-links';
import { readFleetScreen, readSiteScreen, type FleetScreen, type SiteScreen } from './overview';

export type DisplayScreen = { name: string; nowMs: number } & ({ kind: 'site'; site: SiteScreen } | { kind: 'fleet'; fleet: FleetScreen });

/** The screen of a display token; undefined when the link is unknown or revoked (or its site is gone). */
export async function loadDisplayScreen(token: string): Promise<DisplayScreen | undefined> {
  const { db } = await getDatabase();
  const link = await resolveDisplayLink({ db, token });
  if (!link) return undefined;
  const nowMs = Date.now();
  if (link.siteId) {
    const site = await readSiteScreen({ db, viewer: link.viewer, siteId: link.siteId, search: {}, nowMs });
    return site ? { kind: 'site', site, name: link.name, nowMs } : undefined;
  }
  return { kind: 'fleet', fleet: await readFleetScreen({ db, viewer: link.viewer, nowMs }), name: link.name, nowMs };
}
