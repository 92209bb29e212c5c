/**
 * `npx millrace device credentials` and `device export-broker-auth` as a user
 * runs them (the bin, a data folder of their own): printed once, JSON on
 * --json, files Mosquitto reads, and refusals in words.
 */
import { mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runMillrace } from '@/test/support/cli';
import { testFleet, testTag } from '@/test/support/ingest';
import { verifyPassword } from '@/lib/devices/credentials';

const dir = mkdtempSync(join(tmpdir(), 'millrace-device-cli-'));
const fleet = testFleet(testTag(), { windUnits: 2, hydroUnits: 0 });
const [u1, u2] = fleet.units as [(typeof fleet.units)[0], (typeof fleet.units)[0]];

/** The bin with this test's data folder; the ingesters' broker account only when a test gives it. */
const millrace = (args: string[], env: Record<string, string> = {}) => runMillrace(args, join(dir, 'data'), { MQTT_USERNAME: '', MQTT_PASSWORD: '', ...env });

beforeAll(async () => {
  const file = join(dir, 'FLEET.json');
  writeFileSync(file, JSON.stringify(fleet));
  expect((await millrace(['units', 'import', file])).status).toBe(0);
}, 60_000);
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('npx millrace device', () => {
  it('issues credentials once as JSON, then rotates them in words', async () => {
    const json = await millrace(['device', 'credentials', `${u1.siteId}/${u1.id}`, '--json']);
    expect(json.status).toBe(0);
    const first = JSON.parse(json.out) as { username: string; password: string };
    expect(Object.keys(first).sort()).toEqual(['password', 'username']);
    expect(first.username).toBe(`${u1.siteId}.${u1.id}`);
    expect(first.password).toMatch(/^[A-Za-z0-9_-]{22}$/);
    const words = await millrace(['device', 'credentials', `${u1.siteId}/${u1.id}`]);
    expect(words.status).toBe(0);
    expect(words.out).toContain('rotated: the old password no longer works');
    expect(words.out).toContain('Shown once');
    expect(words.out).toContain(`username  ${first.username}`);
    expect(/password {2}(\S+)/.exec(words.out)?.[1]).not.toBe(first.password);
  }, 60_000);

  it('refuses a unit that is not registered, and a malformed one, naming it', async () => {
    const missing = await millrace(['device', 'credentials', `${u1.siteId}/no-such-unit`]);
    expect(missing.status).toBe(2);
    expect(missing.err).toContain(`no unit ${u1.siteId}/no-such-unit`);
    const bad = await millrace(['device', 'credentials', 'just-one-part']);
    expect(bad.status).toBe(2);
    expect(bad.err).toContain('expected SITE/UNIT');
    expect((await millrace(['device', 'nothing'])).status).toBe(2);
  }, 60_000);

  it('exports the password and ACL files Mosquitto reads, with the ingesters\' account from the environment', async () => {
    const issued = JSON.parse((await millrace(['device', 'credentials', `${u2.siteId}/${u2.id}`, '--json'])).out) as { username: string; password: string };
    const out = join(dir, 'broker-auth');
    const ingest = { MQTT_USERNAME: 'millrace-ingest', MQTT_PASSWORD: 'q'.repeat(24) };
    const r = await millrace(['device', 'export-broker-auth', '--dir', out], ingest);
    expect(r.status).toBe(0);
    expect(r.err).toBe('');
    expect(r.out).toContain('2 units and the ingesters\' account millrace-ingest');
    const passwords = readFileSync(join(out, 'passwords'), 'utf8');
    const line = passwords.split('\n').find((l) => l.startsWith(`${issued.username}:`))!;
    expect(await verifyPassword(issued.password, line.slice(line.indexOf(':') + 1))).toBe(true);
    const ingesterLine = passwords.split('\n').find((l) => l.startsWith('millrace-ingest:'))!;
    expect(await verifyPassword(ingest.MQTT_PASSWORD, ingesterLine.slice(ingesterLine.indexOf(':') + 1))).toBe(true);
    expect(passwords).not.toContain(issued.password);
    expect(statSync(join(out, 'passwords')).mode & 0o777).toBe(0o600);
    expect(readFileSync(join(out, 'acl'), 'utf8')).toContain(`user ${issued.username}\ntopic write millrace/${u2.siteId}/${u2.id}/telemetry\n`);
    // Without the ingesters' account it says so.
    const bare = await millrace(['device', 'export-broker-auth', '--dir', out]);
    expect(bare.status).toBe(0);
    expect(bare.err).toContain('MQTT_USERNAME and MQTT_PASSWORD are not set');
    expect((await millrace(['device', 'export-broker-auth'])).err).toContain('--dir is required');
  }, 60_000);

  it('revokes an account: left out of the export, then back with a new password', async () => {
    const out = join(dir, 'broker-auth-revoke');
    const r = await millrace(['device', 'revoke', `${u1.siteId}/${u1.id}`]);
    expect(r.status).toBe(0);
    expect(r.out).toContain('revoked: it can no longer connect');
    await millrace(['device', 'export-broker-auth', '--dir', out]);
    expect(readFileSync(join(out, 'passwords'), 'utf8')).not.toContain(`${u1.siteId}.${u1.id}:`);
    expect((await millrace(['device', 'revoke', `${u1.siteId}/${u1.id}`])).out).toContain('has no MQTT account to revoke');
    expect((await millrace(['device', 'revoke', `${u1.siteId}/nothing-here`])).status).toBe(2);
    expect((await millrace(['device', 'credentials', `${u1.siteId}/${u1.id}`, '--json'])).status).toBe(0);
    await millrace(['device', 'export-broker-auth', '--dir', out]);
    expect(readFileSync(join(out, 'passwords'), 'utf8')).toContain(`${u1.siteId}.${u1.id}:`);
  }, 60_000);

  it('refuses while a running process holds the embedded database', async () => {
    // A lock held by a live process (this one), as a running `npm start` holds it.
    writeFileSync(join(dir, 'data', 'millrace.lock'), JSON.stringify({ pid: process.pid, startedAt: new Date().toISOString(), command: 'npm start' }));
    try {
      const r = await millrace(['device', 'credentials', `${u1.siteId}/${u1.id}`]);
      expect(r.status).toBe(2);
      expect(r.err).toContain(`is in use by process ${process.pid}`);
      expect(r.out).toBe('');
    } finally {
      rmSync(join(dir, 'data', 'millrace.lock'), { force: true });
    }
  }, 60_000);
});
