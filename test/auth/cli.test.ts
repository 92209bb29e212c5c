/**
 * `npx millrace user add` and `token create` as an operator runs them, on a
 * throw-away embedded database: the password from standard input, weak ones
 * refused with the reason, crew without a site refused, the token printed
 * once and stored only as a hash.
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { openDatabase } from '@/db/client';
import { apiTokens } from '@/db/schema';
import { hashSecret } from '@/lib/auth/secrets';

const dir = mkdtempSync(join(tmpdir(), 'millrace-cli-people-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function millrace(args: string[], input = ''): Promise<{ code: number | null; out: string; err: string }> {
  const env: NodeJS.ProcessEnv = { ...process.env, DATA_DIR: join(dir, 'data'), LOG_LEVEL: 'warn' };
  delete env.DATABASE_URL;
  const child = spawn(process.execPath, ['bin/millrace.mjs', ...args], { env, stdio: ['pipe', 'pipe', 'pipe'] });
  let out = '';
  let err = '';
  child.stdout.on('data', (d) => (out += String(d)));
  child.stderr.on('data', (d) => (err += String(d)));
  child.stdin.end(input);
  return new Promise((resolve) => child.once('exit', (code) => resolve({ code, out, err })));
}

describe('user add and token create', () => {
  it('refuses a common password and a short one with the reason, and a crew member without a site', async () => {
    const common = await millrace(['user', 'add', '--email', 'ana@test.invalid', '--role', 'admin'], 'qwerty123456\n');
    expect(common.code).toBe(2);
    expect(common.err).toMatch(/password: is one of the most common passwords/);
    const short = await millrace(['user', 'add', '--email', 'ana@test.invalid', '--role', 'admin'], 'short\n');
    expect(short.err).toMatch(/password: must be at least 12 characters long; it has 5/);
    const crew = await millrace(['user', 'add', '--email', 'bo@test.invalid', '--role', 'crew'], 'weir board lifting key\n');
    expect(crew.code).toBe(2);
    expect(crew.err).toMatch(/--site: a crew sees only their sites: choose at least one/);
    const role = await millrace(['user', 'add', '--email', 'bo@test.invalid', '--role', 'boss'], 'weir board lifting key\n');
    expect(role.err).toMatch(/--role: expected admin, operator, crew or owner/);
    const none = await millrace(['user', 'add', '--email', 'bo@test.invalid', '--role', 'admin']);
    expect(none.err).toMatch(/no password on standard input/);
  }, 60_000);

  it('adds a person, then prints their token once; only its hash is stored', async () => {
    const added = await millrace(['user', 'add', '--email', 'Ana@Test.invalid', '--role', 'admin'], 'weir board lifting key\n');
    expect(added.code, added.err).toBe(0);
    expect(added.out).toContain('Added Ana@Test.invalid as admin');
    const again = await millrace(['user', 'add', '--email', 'ana@test.invalid', '--role', 'operator'], 'weir board lifting key\n');
    expect(again.err).toMatch(/--email: someone has the address/);
    const unknown = await millrace(['token', 'create', '--email', 'nobody@test.invalid']);
    expect(unknown.code).toBe(2);
    expect(unknown.err).toMatch(/nobody has the address nobody@test.invalid/);
    const made = await millrace(['token', 'create', '--email', 'ana@test.invalid', '--name', 'report', '--json']);
    expect(made.code, made.err).toBe(0);
    const { token } = JSON.parse(made.out) as { token: string };
    expect(token).toMatch(/^mrt_[A-Za-z0-9_-]{43}$/);
    const handle = await openDatabase({ dataDir: join(dir, 'data') });
    try {
      const rows = await handle.db.select().from(apiTokens);
      expect(rows.map((r) => r.tokenHash)).toEqual([hashSecret(token)]);
      expect(JSON.stringify(rows)).not.toContain(token.slice(4));
    } finally {
      await handle.close();
    }
  }, 60_000);
});
