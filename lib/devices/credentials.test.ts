import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { mosquitto, skipUnless, type ServiceProbe } from '@/test/support/services';
import { HASH_ITERATIONS, deviceUsername, hashPassword, newPassword, parseHash, verifyPassword } from './credentials';

// mosquitto_passwd lives beside mosquitto on Debian (/usr/bin vs /usr/sbin), so look in both.
const passwdBin = ['/usr/bin/mosquitto_passwd', '/usr/local/bin/mosquitto_passwd', mosquitto.location && join(dirname(mosquitto.location), 'mosquitto_passwd')].find(
  (p): p is string => typeof p === 'string' && existsSync(p),
);
const mosquittoPasswd: ServiceProbe = passwdBin
  ? { name: 'mosquitto_passwd', available: true, location: passwdBin }
  : { name: 'mosquitto_passwd', available: false, missing: 'no mosquitto_passwd in /usr/bin or beside mosquitto: apt-get install mosquitto' };

const dir = mkdtempSync(join(tmpdir(), 'millrace-passwd-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('device passwords', () => {
  it('are 128 random bits, base64url, different every time', () => {
    const seen = new Set<string>();
    for (let i = 0; i < 200; i++) {
      const p = newPassword();
      expect(p).toMatch(/^[A-Za-z0-9_-]{22}$/);
      expect(Buffer.from(p, 'base64url')).toHaveLength(16);
      seen.add(p);
    }
    expect(seen.size).toBe(200);
  });

  it('are hashed in Mosquitto\'s $7$ format with a fresh salt each time', async () => {
    const p = newPassword();
    const a = hashPassword(p);
    const b = hashPassword(p);
    expect(a).toMatch(/^\$7\$101\$[A-Za-z0-9+/]{16}\$[A-Za-z0-9+/]{86}==$/);
    expect(a).not.toBe(b);
    expect(a).not.toContain(p);
    expect(await verifyPassword(p, a)).toBe(true);
    expect(await verifyPassword(p, b)).toBe(true);
    expect(await verifyPassword(Buffer.from(p), a)).toBe(true);
  });

  it('refuse a wrong password, a changed hash and anything that is not a $7$ hash', async () => {
    const p = newPassword();
    const stored = hashPassword(p);
    expect(await verifyPassword(newPassword(), stored)).toBe(false);
    expect(await verifyPassword(`${p}x`, stored)).toBe(false);
    expect(await verifyPassword('', stored)).toBe(false);
    // One bit of the stored hash changed.
    const parts = stored.split('$');
    const hash = Buffer.from(parts[4]!, 'base64');
    hash[0]! ^= 1;
    expect(await verifyPassword(p, [...parts.slice(0, 4), hash.toString('base64')].join('$'))).toBe(false);
    for (const bad of ['', p, '$6$abc$def', '$7$0$AAAA$AAAA', '$7$101$$', `$7$101$${parts[3]}$${Buffer.alloc(32).toString('base64')}`, '$7$99999999999$AAAA$AAAA', `${stored}\n`]) {
      expect(parseHash(bad), bad).toBeUndefined();
      expect(await verifyPassword(p, bad), bad).toBe(false);
    }
  });

  it('names a device by site and unit, readably and unambiguously', () => {
    expect(deviceUsername('north-ridge', 'nr-01')).toBe('north-ridge.nr-01');
    expect(deviceUsername('a', 'b-c')).not.toBe(deviceUsername('a-b', 'c'));
  });

  it('checks a hash mosquitto_passwd 2.0.11 wrote (recorded 2026-12-02 with `mosquitto_passwd -c -b pw dev1 secret123`)', async () => {
    const recorded = '$7$101$H8t/hj4TEazTPk0N$kbRQuVEgcOw0C7pp6KCVc8GouEAAiCnDNPgLOHxjOC7J6A6R8U8getb8tTUINhrl6rZTx0rV2aGskYvlCgP5Ew==';
    expect(await verifyPassword('secret123', recorded)).toBe(true);
    expect(await verifyPassword('secret124', recorded)).toBe(false);
    // Our hash with that salt is the same text, byte for byte.
    expect(hashPassword('secret123', { salt: Buffer.from('H8t/hj4TEazTPk0N', 'base64') })).toBe(recorded);
    expect(HASH_ITERATIONS).toBe(101);
  });

  it.skipIf(skipUnless(mosquittoPasswd, 'our verifier against hashes the real mosquitto_passwd writes'))('accepts what the installed mosquitto_passwd writes now', async () => {
    const file = join(dir, 'passwords');
    const passwords = [newPassword(), 'a longer pass phrase with spaces', 'ünïcödé-ß'];
    passwords.forEach((p, i) => execFileSync(mosquittoPasswd.location!, [...(i === 0 ? ['-c'] : []), '-b', file, `user${i}`, p]));
    const lines = readFileSync(file, 'utf8').trim().split('\n');
    expect(lines).toHaveLength(3);
    for (const [i, line] of lines.entries()) {
      const [user, stored] = [line.slice(0, line.indexOf(':')), line.slice(line.indexOf(':') + 1)];
      expect(user).toBe(`user${i}`);
      expect(parseHash(stored), stored).toBeDefined();
      expect(await verifyPassword(passwords[i]!, stored)).toBe(true);
      expect(await verifyPassword(passwords[(i + 1) % 3]!, stored)).toBe(false);
    }
  });
});
