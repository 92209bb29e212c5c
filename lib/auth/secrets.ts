/**
 * Random bearer secrets (session cookies, API tokens, display links) and the
 * one-way form they are stored in. 32 random bytes (256 bits) each; stored as
 * hex SHA-256, so a copy of the database lets no one sign in. A fast hash is
 * enough here (unlike passwords): the secret has full entropy.
 */
import { createHash, randomBytes } from 'node:crypto';

/** Prefixes say what a secret is when one turns up in a log or a paste. */
export type SecretKind = 'session' | 'api' | 'display';
const PREFIX: Record<SecretKind, string> = { session: '', api: 'mrt_', display: 'mrd_' };

/**
 * A new random secret of 256 bits, base64url, with its kind's prefix.
 * @example newSecret('api') // 'mrt_3q2-…' (47 characters)
 */
export function newSecret(kind: SecretKind): string {
  return PREFIX[kind] + randomBytes(32).toString('base64url');
}

/**
 * The stored form of a secret: SHA-256, hex.
 * @example hashSecret('abc') // 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad'
 */
export function hashSecret(secret: string): string {
  return createHash('sha256').update(secret, 'utf8').digest('hex');
}

/** Whether a string has the shape of a secret of that kind (checked before any lookup). */
export function looksLikeSecret(kind: SecretKind, value: string): boolean {
  return value.startsWith(PREFIX[kind]) && /^[A-Za-z0-9_-]{43}$/.test(value.slice(PREFIX[kind].length));
}
