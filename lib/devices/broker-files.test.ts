import { mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { brokerAuthFiles, ingesterAccount, writeBrokerAuthFiles } from './broker-files';
import { hashPassword, verifyPassword } from './credentials';
import type { BrokerAccount } from './queries';

const dir = mkdtempSync(join(tmpdir(), 'millrace-broker-files-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const devices: BrokerAccount[] = [
  { role: 'device', username: 'north-ridge.nr-01', passwordHash: hashPassword('a'.repeat(22)), siteId: 'north-ridge', unitId: 'nr-01' },
  { role: 'device', username: 'river-bend.rb-02', passwordHash: hashPassword('b'.repeat(22)), siteId: 'river-bend', unitId: 'rb-02' },
];

describe("Mosquitto's files", () => {
  it('give each unit write access to its own two topics and the ingesters read access to all units', () => {
    const ingester = ingesterAccount({ username: 'millrace-ingest', password: 'p'.repeat(32), devices })!;
    const { passwords, acl } = brokerAuthFiles([ingester, ...devices]);
    expect(passwords.split('\n')).toEqual([`millrace-ingest:${ingester.passwordHash}`, `north-ridge.nr-01:${devices[0]!.passwordHash}`, `river-bend.rb-02:${devices[1]!.passwordHash}`, '']);
    const rules = acl.split('\n').filter((l) => l !== '' && !l.startsWith('#'));
    expect(rules).toEqual([
      'user millrace-ingest',
      'topic read millrace/+/+/telemetry',
      'topic read millrace/+/+/presence',
      'user north-ridge.nr-01',
      'topic write millrace/north-ridge/nr-01/telemetry',
      'topic write millrace/north-ridge/nr-01/presence',
      'user river-bend.rb-02',
      'topic write millrace/river-bend/rb-02/telemetry',
      'topic write millrace/river-bend/rb-02/presence',
    ]);
    // Nothing before the first user line: such rules would apply to every client.
    expect(acl.split('\n').findIndex((l) => l.startsWith('topic') || l.startsWith('pattern'))).toBeGreaterThan(acl.split('\n').indexOf('user millrace-ingest'));
  });

  it('hash the ingesters\' password afresh, and refuse a short one, a bad username or a unit\'s', async () => {
    const a = ingesterAccount({ username: 'millrace-ingest', password: 'p'.repeat(16), devices })!;
    const b = ingesterAccount({ username: 'millrace-ingest', password: 'p'.repeat(16), devices })!;
    expect(a.passwordHash).not.toBe(b.passwordHash);
    expect(await verifyPassword('p'.repeat(16), a.passwordHash)).toBe(true);
    expect(ingesterAccount({ username: undefined, password: 'p'.repeat(16), devices })).toBeUndefined();
    expect(ingesterAccount({ username: 'millrace-ingest', password: undefined, devices })).toBeUndefined();
    expect(() => ingesterAccount({ username: 'millrace-ingest', password: 'p'.repeat(15), devices })).toThrow(/MQTT_PASSWORD: expected at least 16 characters/);
    expect(() => ingesterAccount({ username: 'north-ridge.nr-01', password: 'p'.repeat(16), devices })).toThrow(/MQTT_USERNAME/);
    expect(() => ingesterAccount({ username: 'ingest:all', password: 'p'.repeat(16), devices })).toThrow(/MQTT_USERNAME/);
    expect(() => brokerAuthFiles([{ ...devices[0]!, username: 'a\nuser b' }])).toThrow(RangeError);
  });

  it('are written with modes 0600 (hashes) and 0644 (rules), replacing what was there', () => {
    writeBrokerAuthFiles({ dir, accounts: devices });
    const { passwordFile, aclFile } = writeBrokerAuthFiles({ dir, accounts: devices.slice(0, 1) });
    expect(statSync(passwordFile).mode & 0o777).toBe(0o600);
    expect(statSync(aclFile).mode & 0o777).toBe(0o644);
    expect(readFileSync(passwordFile, 'utf8')).not.toContain('river-bend');
    expect(readFileSync(aclFile, 'utf8')).not.toContain('river-bend');
  });
});
