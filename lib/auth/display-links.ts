/**
 * Display links for wall screens: a long random token in the URL
 * (/display/<token>) that shows one site or the whole fleet, read only, and
 * nothing else (no setup, no API, no other pages). Revocable; kept until
 * revoked. The page sends no referrer, so the token does not leak in links.
 */
import { and, desc, eq, isNull } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { displayLinks, sites, type DisplayLinkRow } from '@/db/schema';
import { writeAudit, type Actor } from './audit';
import { hashSecret, looksLikeSecret, newSecret } from './secrets';
import type { Viewer } from './viewer';

/** Makes a link for a site (or the fleet when siteId is undefined); the token is returned here only. */
export async function createDisplayLink({ db, actor, createdBy, siteId, name }: { db: Db; actor: Actor; createdBy: number; siteId?: string; name: string }): Promise<{ ok: true; token: string; row: DisplayLinkRow } | { ok: false; problem: string }> {
  if (siteId !== undefined) {
    const [site] = await db.select({ id: sites.id }).from(sites).where(eq(sites.id, siteId)).limit(1);
    if (!site) return { ok: false, problem: `no site "${siteId}"` };
  }
  const token = newSecret('display');
  const [row] = await db
    .insert(displayLinks)
    .values({ tokenHash: hashSecret(token), name: name.trim().slice(0, 100) || (siteId ? `site ${siteId}` : 'fleet'), siteId: siteId ?? null, createdBy })
    .returning();
  await writeAudit({ db, actor, action: 'display-link-created', target: siteId ? `site ${siteId}` : 'fleet', detail: { linkId: row!.id, name: row!.name } });
  return { ok: true, token, row: row! };
}

/** Display links made by a person, newest first. */
export async function getDisplayLinksByCreator({ db, personId }: { db: Db; personId: number }): Promise<Omit<DisplayLinkRow, 'tokenHash'>[]> {
  return db
    .select({ id: displayLinks.id, name: displayLinks.name, siteId: displayLinks.siteId, createdBy: displayLinks.createdBy, createdAt: displayLinks.createdAt, lastUsedAt: displayLinks.lastUsedAt, revokedAt: displayLinks.revokedAt })
    .from(displayLinks)
    .where(eq(displayLinks.createdBy, personId))
    .orderBy(desc(displayLinks.createdAt), desc(displayLinks.id));
}

export async function revokeDisplayLink({ db, actor, linkId, now = new Date() }: { db: Db; actor: Actor; linkId: number; now?: Date }): Promise<boolean> {
  const [row] = await db.update(displayLinks).set({ revokedAt: now }).where(and(eq(displayLinks.id, linkId), isNull(displayLinks.revokedAt))).returning();
  if (row) await writeAudit({ db, actor, action: 'display-link-revoked', target: row.siteId ? `site ${row.siteId}` : 'fleet', detail: { linkId: row.id, name: row.name } });
  return row !== undefined;
}

/** The read-only viewer of a live display link, or undefined. */
export async function resolveDisplayLink({ db, token, now = new Date() }: { db: Db; token: string; now?: Date }): Promise<{ viewer: Viewer; siteId: string | null; name: string } | undefined> {
  if (!looksLikeSecret('display', token)) return undefined;
  const [row] = await db.select().from(displayLinks).where(and(eq(displayLinks.tokenHash, hashSecret(token)), isNull(displayLinks.revokedAt))).limit(1);
  if (!row) return undefined;
  if (!row.lastUsedAt || now.getTime() - row.lastUsedAt.getTime() >= 60_000) await db.update(displayLinks).set({ lastUsedAt: now }).where(eq(displayLinks.id, row.id));
  return {
    viewer: { id: `display:${row.id}`, role: 'owner', siteIds: row.siteId ? [row.siteId] : 'all', via: 'display' },
    siteId: row.siteId,
    name: row.name,
  };
}
