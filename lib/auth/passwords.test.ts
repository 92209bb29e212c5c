/**
 * Password hashing and rules. The scrypt primitive is checked against the
 * test vectors of RFC 7914 ("The scrypt Password-Based Key Derivation
 * Function", section 12), so a wrong N, r or p in our wrapper fails here.
 */
import { describe, expect, it } from 'vitest';
import { hashPassword, MIN_PASSWORD_LENGTH, needsRehash, passwordProblem, SCRYPT_PARAMS, scryptRaw, verifyPassword } from './passwords';

const FAST = { logN: 10, r: 8, p: 1 } as const; // tests only: the stored form carries its parameters

describe('scrypt primitive', () => {
  it('gives RFC 7914 section 12 vector 2 (P="password", S="NaCl", N=1024, r=8, p=16, dkLen=64)', async () => {
    const key = await scryptRaw('password', 'NaCl', { logN: 10, r: 8, p: 16 }, 64);
    // RFC 7914, section 12, second vector.
    expect(key.toString('hex')).toBe(
      'fdbabe1c9d3472007856e7190d01e9fe7c6ad7cbc8237830e77376634b3731622eaf30d92e22a3886ff109279d9830dac727afb94a83ee6d8360cbdfa2cc0640',
    );
  });

  it('gives RFC 7914 section 12 vector 3 (P="pleaseletmein", S="SodiumChloride", N=16384, r=8, p=1, dkLen=64)', async () => {
    const key = await scryptRaw('pleaseletmein', 'SodiumChloride', { logN: 14, r: 8, p: 1 }, 64);
    // RFC 7914, section 12, third vector.
    expect(key.toString('hex')).toBe(
      '7023bdcb3afd7348461c06cd81fd38ebfda8fbba904f8e3ea9b543f6545da1f2d5432955613f0fcf62d49705242a9af9e61e85dc0d651e40dfcf017b45575887',
    );
  });
});

describe('stored hashes', () => {
  it('uses N = 2^17, r = 8, p = 1 by default (OWASP password storage minimum for scrypt) and names them in the stored form', async () => {
    expect(SCRYPT_PARAMS).toEqual({ logN: 17, r: 8, p: 1 });
    const stored = await hashPassword('a long enough passphrase');
    expect(stored).toMatch(/^scrypt\$17\$8\$1\$[A-Za-z0-9_-]{22}\$[A-Za-z0-9_-]{43}$/);
    expect(await verifyPassword('a long enough passphrase', stored)).toBe(true);
    expect(needsRehash(stored)).toBe(false);
  }, 20_000);

  it('verifies the right password only, salts each hash, and flags weaker parameters for a re-hash', async () => {
    const a = await hashPassword('correct horse battery', FAST);
    const b = await hashPassword('correct horse battery', FAST);
    expect(a).not.toBe(b);
    expect(await verifyPassword('correct horse battery', a)).toBe(true);
    expect(await verifyPassword('correct horse batterY', a)).toBe(false);
    expect(await verifyPassword('', a)).toBe(false);
    expect(needsRehash(a)).toBe(true);
  });

  it('matches nothing against a stored value that is not one of our hashes', async () => {
    for (const stored of ['', 'plaintext', 'scrypt$17$8$1$$', 'scrypt$40$8$1$AAAA$AAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA', '$2b$10$abcdefghijklmnopqrstuv']) {
      expect(await verifyPassword('plaintext', stored), stored).toBe(false);
    }
  });

  it('treats composed and decomposed accents as the same password (NFC)', async () => {
    const stored = await hashPassword('cr\u00e8me br\u00fbl\u00e9e pudding', FAST);
    expect(await verifyPassword('cre\u0300me bru\u0302le\u0301e pudding', stored)).toBe(true);
  });
});

describe('password rules', () => {
  it('asks for at least 12 characters, counted as characters not bytes', () => {
    expect(MIN_PASSWORD_LENGTH).toBe(12);
    expect(passwordProblem('abcdefghijk')).toMatch(/at least 12 characters.*11/);
    expect(passwordProblem('ärgerlich ok')).toBeUndefined();
    expect(passwordProblem('🌬️🌬️🌬️🌬️🌬️')).toMatch(/at least 12/); // 10 code points
  });

  it('has no composition rules: all lower-case words pass', () => {
    expect(passwordProblem('river turbine meadow')).toBeUndefined();
  });

  it('refuses common passwords, whatever their case', () => {
    expect(passwordProblem('qwerty123456')).toMatch(/most common passwords/);
    expect(passwordProblem('QWERTY123456')).toMatch(/most common passwords/);
    expect(passwordProblem('1qaz2wsx3edc')).toMatch(/most common passwords/);
  });

  it('refuses the e-mail address as password, and more than 128 characters', () => {
    expect(passwordProblem('ana@example.invalid', { email: 'Ana@Example.invalid' })).toMatch(/e-mail/);
    expect(passwordProblem('x'.repeat(129))).toMatch(/at most 128/);
  });
});
