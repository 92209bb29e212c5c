/**
 * What the live route needs from the database: whether the viewer may follow
 * a site (and one of its units).
 */
import { and, eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { sites, units } from '@/db/schema';
import { canSeeSite, type Viewer } from '@/lib/auth/viewer';

export interface LiveScope {
  siteId: string;
  unitId?: string;
}

/**
 * The site (and unit) to follow, or undefined when there is no such site,
 * no such unit on it, or the viewer may not see it (the three are not told apart).
 */
export async function getLiveScope({ db, viewer, siteId, unitId }: { db: Db; viewer: Viewer; siteId: string; unitId?: string }): Promise<LiveScope | undefined> {
  if (!canSeeSite(viewer, siteId)) return undefined;
  if (unitId === undefined) {
    const [site] = await db.select({ id: sites.id }).from(sites).where(eq(sites.id, siteId)).limit(1);
    return site ? { siteId } : undefined;
  }
  const [unit] = await db
    .select({ id: units.id })
    .from(units)
    .where(and(eq(units.id, unitId), eq(units.siteId, siteId)))
    .limit(1);
  return unit ? { siteId, unitId } : undefined;
}
