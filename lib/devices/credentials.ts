/**
 * MQTT passwords of devices and ingesters: made, hashed and checked. Pure
 * (node:crypto only, no I/O).
 *
 * Passwords are random, 128 bits (16 bytes from randomBytes, base64url: 22
 * characters), shown once and stored only as a hash in Mosquitto's own format
 * (mosquitto_passwd's default since Mosquitto 2.0):
 *
 *   $7$<iterations>$<base64 salt>$<base64 hash>
 *
 * PBKDF2-HMAC-SHA512 with a 12-byte salt and a 64-byte hash, standard base64
 * with padding. The same stored hash checks a device on the embedded broker
 * and goes as it is into Mosquitto's password file.
 *
 * Iterations: 101, mosquitto_passwd's own default. A password of 128 random
 * bits cannot be guessed whatever the iteration count (2^127 tries on
 * average); the hash is there so that a copy of the database or of the
 * password file does not hand out passwords that work, and the salt so that
 * equal passwords do not show. Stretching protects passwords that people
 * choose, which these are not. What the count does cost is CPU on every
 * connect: Mosquitto checks the hash on each CONNECT with no cache, so a
 * reconnect storm of a whole fleet pays it once per device (`npm run
 * bench:connect`, 2026-12-02, our 2-core machine, Node 20: 0.07 ms a check at
 * 101 iterations, 0.5 ms at 1,000, 5.3 ms at 10,000).
 */
import { pbkdf2Sync, randomBytes, timingSafeEqual } from 'node:crypto';
import { promisify } from 'node:util';
import { pbkdf2 } from 'node:crypto';

const pbkdf2Async = promisify(pbkdf2);

/** PBKDF2 iterations of new hashes (see the module comment for why so few). */
export const HASH_ITERATIONS = 101;
/** Salt and hash lengths of Mosquitto's `$7$` format, bytes. */
export const SALT_BYTES = 12;
export const HASH_BYTES = 64;
/** Random bytes of a new password: 128 bits. */
export const PASSWORD_BYTES = 16;
/** Highest iteration count a stored hash may ask for: a hash must not be able to make each connect cost seconds. */
export const MAX_ITERATIONS = 1_000_000;

/**
 * A device's MQTT username: `<siteId>.<unitId>`. Slugs are `[a-z0-9-]`, so
 * the dot separates them unambiguously, and a person reading a broker log
 * sees which unit it is.
 * @example deviceUsername('north-ridge', 'nr-01') // 'north-ridge.nr-01'
 */
export function deviceUsername(siteId: string, unitId: string): string {
  return `${siteId}.${unitId}`;
}

/**
 * A new random password: 128 bits as base64url (22 characters, no padding).
 * @example newPassword().length // 22
 */
export function newPassword(): string {
  return randomBytes(PASSWORD_BYTES).toString('base64url');
}

/** The parts of a `$7$` hash; undefined when `stored` is not one. */
export function parseHash(stored: string): { iterations: number; salt: Buffer; hash: Buffer } | undefined {
  const m = /^\$7\$([1-9][0-9]{0,9})\$([A-Za-z0-9+/]+={0,2})\$([A-Za-z0-9+/]+={0,2})$/.exec(stored);
  if (!m) return undefined;
  const iterations = Number(m[1]);
  if (iterations > MAX_ITERATIONS) return undefined;
  const salt = Buffer.from(m[2]!, 'base64');
  const hash = Buffer.from(m[3]!, 'base64');
  if (salt.length === 0 || hash.length !== HASH_BYTES) return undefined;
  return { iterations, salt, hash };
}

/**
 * The `$7$` hash of `password`, with a new random salt (or the one given).
 * @example hashPassword('s3cret', { salt: Buffer.alloc(12) }).startsWith('$7$101$AAAAAAAAAAAAAAAA$') // true
 */
export function hashPassword(password: string, { iterations = HASH_ITERATIONS, salt = randomBytes(SALT_BYTES) }: { iterations?: number; salt?: Buffer } = {}): string {
  if (!Number.isInteger(iterations) || iterations < 1 || iterations > MAX_ITERATIONS) {
    throw new RangeError(`iterations must be a whole number from 1 to ${MAX_ITERATIONS}, got ${iterations}`);
  }
  const hash = pbkdf2Sync(Buffer.from(password, 'utf8'), salt, iterations, HASH_BYTES, 'sha512');
  return `$7$${iterations}$${salt.toString('base64')}$${hash.toString('base64')}`;
}

/**
 * Whether `password` matches the stored `$7$` hash (constant-time compare;
 * false for anything that is not a well-formed hash). Asynchronous: PBKDF2
 * runs on libuv's thread pool, so a burst of connects does not hold the
 * event loop.
 */
export async function verifyPassword(password: string | Buffer, stored: string): Promise<boolean> {
  const parsed = parseHash(stored);
  if (!parsed) return false;
  const given = typeof password === 'string' ? Buffer.from(password, 'utf8') : password;
  const computed = await pbkdf2Async(given, parsed.salt, parsed.iterations, HASH_BYTES, 'sha512');
  return timingSafeEqual(computed, parsed.hash);
}
