/**
 * Mosquitto's password file and ACL file from the accounts in the database
 * (`npx millrace device export-broker-auth --dir DIR`).
 *
 * passwords: `username:$7$...` a line, the stored hashes as they are
 * (Mosquitto's own PBKDF2 format, credentials.ts). acl: each device may write
 * only its own telemetry and presence topics and read nothing; the ingesters'
 * account may read telemetry and presence of every unit and write nothing.
 * Mosquitto 2.0 checks a `$share/<group>/<filter>` subscription against the
 * ACL as `<filter>` (test/devices/broker-access.test.ts shows it on a real
 * Mosquitto), so the two `read` lines serve the ingesters' shared
 * subscription. Revoked accounts are left out. Mosquitto reads both files at
 * start and on SIGHUP.
 */
import { chmodSync, mkdirSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { deviceTopics } from '@/lib/broker/access';
import { AppError } from '@/lib/errors/app-error';
import { hashPassword } from './credentials';
import type { BrokerAccount } from './queries';

/** Shortest ingesters' password the export takes (`openssl rand -hex 24` makes 48 characters). */
export const MIN_INGESTER_PASSWORD_LENGTH = 16;

/**
 * The ingesters' account from MQTT_USERNAME and MQTT_PASSWORD, hashed now
 * with a new salt; undefined when either is unset. Refuses a short password
 * (the hash is fast: it is meant for long random secrets) and a username
 * that is a unit's.
 */
export function ingesterAccount({ username, password, devices }: { username?: string | undefined; password?: string | undefined; devices: readonly BrokerAccount[] }): BrokerAccount | undefined {
  if (username === undefined || password === undefined) return undefined;
  if (!/^[A-Za-z0-9_-]{1,64}$/.test(username)) {
    throw new AppError('bad-input', 'cli', `MQTT_USERNAME: expected 1 to 64 of A-Z, a-z, 0-9, _ and - (no dot: units' usernames have one), got ${JSON.stringify(username)}`);
  }
  if (password.length < MIN_INGESTER_PASSWORD_LENGTH) {
    throw new AppError('bad-input', 'cli', `MQTT_PASSWORD: expected at least ${MIN_INGESTER_PASSWORD_LENGTH} characters (make one with openssl rand -hex 24), got ${password.length}`);
  }
  if (devices.some((d) => d.username === username)) throw new AppError('bad-input', 'cli', `MQTT_USERNAME: ${username} is a unit's username`);
  return { role: 'ingester', username, passwordHash: hashPassword(password) };
}

/** The topics the ingesters' account may read. */
export const INGESTER_READ_TOPICS = ['millrace/+/+/telemetry', 'millrace/+/+/presence'] as const;

const HEADER = '# Written by `npx millrace device export-broker-auth`; edits are lost at the next export.';

/** The two files' text. */
export function brokerAuthFiles(accounts: readonly BrokerAccount[]): { passwords: string; acl: string } {
  for (const a of accounts) {
    // Mosquitto splits each line at the first colon; a newline would start another entry.
    if (!/^[A-Za-z0-9._-]+$/.test(a.username)) throw new RangeError(`username ${JSON.stringify(a.username)} cannot go into a Mosquitto password file`);
  }
  const passwords = accounts.map((a) => `${a.username}:${a.passwordHash}\n`).join('');
  const acl = [
    HEADER,
    '# Devices write only their own telemetry and presence and read nothing;',
    '# the ingesters read every unit\'s telemetry and presence and write nothing.',
    '# Nothing here applies to anonymous clients: the broker refuses them.',
    '',
    ...accounts.flatMap((a) =>
      a.role === 'ingester'
        ? [`user ${a.username}`, ...INGESTER_READ_TOPICS.map((t) => `topic read ${t}`), '']
        : [`user ${a.username}`, ...deviceTopics(a.siteId, a.unitId).map((t) => `topic write ${t}`), ''],
    ),
  ].join('\n');
  return { passwords, acl };
}

/**
 * Writes DIR/passwords (mode 0600: hashes, for the broker only) and DIR/acl
 * (0644), each through a temporary file and a rename, so a broker reloading
 * meanwhile never reads half a file.
 */
export function writeBrokerAuthFiles({ dir, accounts }: { dir: string; accounts: readonly BrokerAccount[] }): { passwordFile: string; aclFile: string } {
  const { passwords, acl } = brokerAuthFiles(accounts);
  mkdirSync(dir, { recursive: true });
  const put = (name: string, text: string, mode: number) => {
    const path = join(dir, name);
    const temporary = `${path}.${process.pid}.tmp`;
    writeFileSync(temporary, text, { mode });
    chmodSync(temporary, mode);
    renameSync(temporary, path);
    return path;
  };
  return { passwordFile: put('passwords', passwords, 0o600), aclFile: put('acl', acl, 0o644) };
}
