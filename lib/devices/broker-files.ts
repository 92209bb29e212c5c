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
import { deviceTopics } from '../broker/access';
import type { BrokerAccount } from './queries';

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
