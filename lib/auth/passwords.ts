/**
 * Password hashing and the password rules.
 *
 * Hash: scrypt from node:crypto with N = 2^17, r = 8, p = 1 (the minimum
 * OWASP's Password Storage Cheat Sheet gives for scrypt, which OWASP ASVS 5.0
 * section 11.4 defers to for password storage), a 16-byte random salt and a
 * 32-byte key. scrypt needs 128·N·r bytes = 128 MiB of memory per hash, more
 * than node's default `maxmem` of 32 MiB, so `maxmem` is raised to 256 MiB.
 * The stored form names its parameters, so that they can be raised later and
 * old hashes still verify: `scrypt$17$8$1$<salt base64url>$<key base64url>`
 * (17 is log2 N).
 *
 * Rules (ASVS 5.0 section 6.2): at least 12 characters, up to 128; no
 * composition rules; refused when among the common passwords, or the same as
 * the person's e-mail address. Paste and password managers are welcome.
 */
import { randomBytes, scrypt as scryptCallback, timingSafeEqual, type ScryptOptions } from 'node:crypto';
import { dictionary } from '@zxcvbn-ts/language-common';

/** The parameters of a scrypt hash. */
export interface ScryptParams {
  /** log2 of the CPU/memory cost N. */
  readonly logN: number;
  readonly r: number;
  readonly p: number;
}

/** OWASP's scrypt minimum: N = 2^17, r = 8, p = 1. */
export const SCRYPT_PARAMS: ScryptParams = Object.freeze({ logN: 17, r: 8, p: 1 });

const KEY_BYTES = 32;
const SALT_BYTES = 16;
/** Bytes of memory a hash with these parameters needs (128·N·r), plus room. */
function maxmemFor({ logN, r }: ScryptParams): number {
  return 128 * 2 ** logN * r * 2;
}

/**
 * The raw scrypt primitive (RFC 7914), as a promise.
 * @example await scryptRaw('password', 'NaCl', { logN: 10, r: 8, p: 16 }, 64) // RFC 7914's second vector
 */
export function scryptRaw(password: string | Buffer, salt: string | Buffer, params: ScryptParams, keyBytes: number): Promise<Buffer> {
  const options: ScryptOptions = { N: 2 ** params.logN, r: params.r, p: params.p, maxmem: maxmemFor(params) };
  return new Promise((resolve, reject) => {
    scryptCallback(typeof password === 'string' ? password.normalize('NFC') : password, salt, keyBytes, options, (error, key) =>
      error ? reject(error) : resolve(key),
    );
  });
}

/**
 * Hashes a password into the stored form. `params` is for tests only: people's
 * passwords always take the default.
 * @example await hashPassword('correct horse battery staple') // 'scrypt$17$8$1$…$…'
 */
export async function hashPassword(password: string, params: ScryptParams = SCRYPT_PARAMS): Promise<string> {
  const salt = randomBytes(SALT_BYTES);
  const key = await scryptRaw(password, salt, params, KEY_BYTES);
  return ['scrypt', params.logN, params.r, params.p, salt.toString('base64url'), key.toString('base64url')].join('$');
}

const STORED = /^scrypt\$(\d{1,2})\$(\d{1,3})\$(\d{1,3})\$([A-Za-z0-9_-]+)\$([A-Za-z0-9_-]+)$/;

/**
 * Whether `password` matches a stored hash; compares in constant time. A
 * stored value that is not a hash of ours matches nothing.
 */
export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const m = STORED.exec(stored);
  if (!m) return false;
  const params: ScryptParams = { logN: Number(m[1]), r: Number(m[2]), p: Number(m[3]) };
  if (params.logN < 10 || params.logN > 22 || params.r < 1 || params.p < 1) return false;
  const salt = Buffer.from(m[4]!, 'base64url');
  const expected = Buffer.from(m[5]!, 'base64url');
  if (expected.length < 16) return false;
  const key = await scryptRaw(password, salt, params, expected.length);
  return timingSafeEqual(key, expected);
}

/** Whether a stored hash uses weaker parameters than today's (re-hash at the next sign-in). */
export function needsRehash(stored: string): boolean {
  const m = STORED.exec(stored);
  return !m || Number(m[1]) < SCRYPT_PARAMS.logN || Number(m[2]) < SCRYPT_PARAMS.r;
}

/** A hash of a random password, to spend the same time on an e-mail address nobody has. */
let dummyHash: Promise<string> | undefined;
export function dummyPasswordHash(): Promise<string> {
  dummyHash ??= hashPassword(randomBytes(24).toString('base64url'));
  return dummyHash;
}

export const MIN_PASSWORD_LENGTH = 12;
export const MAX_PASSWORD_LENGTH = 128;

/**
 * The common passwords: the "passwords-common" dictionary of
 * @zxcvbn-ts/language-common 4.1.3 (MIT, github.com/zxcvbn-ts/zxcvbn), about
 * 49,000 passwords ranked by how often they appear in public password lists.
 * Compared without regard to case.
 */
let common: Set<string> | undefined;
function commonPasswords(): Set<string> {
  common ??= new Set(dictionary['passwords-common'].map((p) => p.toLowerCase()));
  return common;
}

/**
 * Why a password is refused, in words for the person choosing it, or
 * undefined when it is fine. Length counts characters (code points), not bytes.
 * @example passwordProblem('password') // 'must be at least 12 characters long; it has 8'
 */
export function passwordProblem(password: string, context: { email?: string } = {}): string | undefined {
  const length = [...password].length;
  if (length < MIN_PASSWORD_LENGTH) return `must be at least ${MIN_PASSWORD_LENGTH} characters long; it has ${length}`;
  if (length > MAX_PASSWORD_LENGTH) return `must be at most ${MAX_PASSWORD_LENGTH} characters long; it has ${length}`;
  const lower = password.toLowerCase();
  if (commonPasswords().has(lower) || commonPasswords().has(lower.trim())) {
    return 'is one of the most common passwords, which are tried first: choose another (a few unrelated words work well)';
  }
  if (context.email && lower.trim() === context.email.trim().toLowerCase()) return 'must not be your e-mail address';
  return undefined;
}
