/**
 * API tokens (contract, section 6): `Authorization: Bearer <token>` carries
 * its person's role and sites. Printed once when made, stored as SHA-256,
 * listed by name and revocable; a disabled person's tokens stop working.
 */
import { and, desc, eq, isNull } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { apiTokens, people, type ApiTokenRow, type PersonRow } from '@/db/schema';
import { writeAudit, type Actor } from './audit';
import { hashSecret, looksLikeSecret, newSecret } from './secrets';

/** Marks last use at most this often. */
const TOUCH_EVERY_MS = 60_000;

/** Makes a token for a person; the token itself is returned here only. */
export async function createApiToken({ db, actor, person, name }: { db: Db; actor: Actor; person: Pick<PersonRow, 'id' | 'email'>; name: string }): Promise<{ token: string; row: ApiTokenRow }> {
  const token = newSecret('api');
  const [row] = await db.insert(apiTokens).values({ tokenHash: hashSecret(token), name: name.trim().slice(0, 100) || 'token', personId: person.id }).returning();
  await writeAudit({ db, actor, action: 'api-token-created', target: `person ${person.email}`, detail: { tokenId: row!.id, name: row!.name } });
  return { token, row: row! };
}

/** A person's tokens, newest first (never the secret: it is not kept). */
export async function getApiTokensOfPerson({ db, personId }: { db: Db; personId: number }): Promise<Omit<ApiTokenRow, 'tokenHash'>[]> {
  return db
    .select({ id: apiTokens.id, name: apiTokens.name, personId: apiTokens.personId, createdAt: apiTokens.createdAt, lastUsedAt: apiTokens.lastUsedAt, revokedAt: apiTokens.revokedAt })
    .from(apiTokens)
    .where(eq(apiTokens.personId, personId))
    .orderBy(desc(apiTokens.createdAt), desc(apiTokens.id));
}

/** Revokes one token of a person; false when there is no such live token. */
export async function revokeApiToken({ db, actor, personId, tokenId, now = new Date() }: { db: Db; actor: Actor; personId: number; tokenId: number; now?: Date }): Promise<boolean> {
  const [row] = await db
    .update(apiTokens)
    .set({ revokedAt: now })
    .where(and(eq(apiTokens.id, tokenId), eq(apiTokens.personId, personId), isNull(apiTokens.revokedAt)))
    .returning();
  if (row) await writeAudit({ db, actor, action: 'api-token-revoked', target: `token ${row.id}`, detail: { name: row.name, personId } });
  return row !== undefined;
}

/** The person of a live token, or undefined (unknown, revoked, person disabled). */
export async function resolveApiToken({ db, token, now = new Date() }: { db: Db; token: string; now?: Date }): Promise<PersonRow | undefined> {
  if (!looksLikeSecret('api', token)) return undefined;
  const [row] = await db
    .select({ token: apiTokens, person: people })
    .from(apiTokens)
    .innerJoin(people, eq(people.id, apiTokens.personId))
    .where(and(eq(apiTokens.tokenHash, hashSecret(token)), isNull(apiTokens.revokedAt)))
    .limit(1);
  if (!row || row.person.disabled) return undefined;
  if (!row.token.lastUsedAt || now.getTime() - row.token.lastUsedAt.getTime() >= TOUCH_EVERY_MS) {
    await db.update(apiTokens).set({ lastUsedAt: now }).where(eq(apiTokens.id, row.token.id));
  }
  return row.person;
}
