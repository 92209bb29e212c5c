/**
 * `npx millrace device ...` (contract, section 4):
 *
 * - `device credentials SITE/UNIT [--json]` issues a unit's MQTT username and
 *   password, or rotates the password; printed once (only a hash is kept).
 * - `device revoke SITE/UNIT` revokes a unit's account (a lost or stolen
 *   device); `device credentials` brings it back with a new password.
 * - `device export-broker-auth --dir DIR` writes DIR/passwords and DIR/acl
 *   for Mosquitto: the units' accounts from the database, and the ingesters'
 *   account from MQTT_USERNAME / MQTT_PASSWORD of the environment it runs in
 *   (the ingesters read the same two variables; docker-compose keeps them in
 *   .env, beside POSTGRES_PASSWORD). That password is never stored in the
 *   database: each export hashes it afresh.
 *
 * Whoever runs these may change everything (the local viewer), as with
 * `units import`. A rotation is announced on the live feed (NOTIFY on
 * PostgreSQL), so a running product's embedded broker cuts the device off.
 */
import { LOCAL_VIEWER } from '@/lib/auth/viewer';
import { SLUG } from '@/lib/contract/nameplate';
import { getConfig } from '@/lib/config/env';
import { listBrokerAccounts, issueDeviceCredentials, revokeDeviceCredentials } from '@/lib/devices/queries';
import { ingesterAccount } from '@/lib/devices/broker-files';
import { writeBrokerAuthFiles } from '@/lib/devices/broker-files';
import { AppError } from '@/lib/errors/app-error';
import { createLivePublisher } from '@/lib/live/publisher';
import { parseOptions } from './args';
import { openCliDatabase } from './database';
import type { CliIo } from './main';

function parseUnit(value: string | undefined): { siteId: string; unitId: string } {
  if (value === undefined) throw new AppError('bad-input', 'cli', 'the unit is missing (SITE/UNIT)');
  const [siteId, unitId, ...more] = value.split('/');
  if (siteId === undefined || unitId === undefined || more.length > 0 || !SLUG.test(siteId) || !SLUG.test(unitId)) {
    throw new AppError('bad-input', 'cli', `expected SITE/UNIT (two ids of a-z, 0-9 and -), got "${value}"`);
  }
  return { siteId, unitId };
}

async function credentials(args: string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseOptions(args, { json: { type: 'boolean' } });
  if (positionals.length > 1) throw new AppError('bad-input', 'cli', `device credentials: unexpected argument "${positionals[1]}"`);
  const { siteId, unitId } = parseUnit(positionals[0]);
  const handle = await openCliDatabase();
  try {
    const live = createLivePublisher({ handle });
    const result = await issueDeviceCredentials({ db: handle.db, viewer: LOCAL_VIEWER, siteId, unitId, live });
    await live.flush();
    if (!result.ok) throw new AppError(result.reason === 'not-found' ? 'not-found' : 'bad-input', 'cli', `${result.message} (${handle.location}); register it first with units import`);
    if (values.json) {
      io.stdout.write(`${JSON.stringify({ username: result.username, password: result.password })}\n`);
      return 0;
    }
    io.stdout.write(
      `MQTT account of unit ${siteId}/${unitId} ${result.rotated ? 'rotated: the old password no longer works' : 'issued'}.\n` +
        `Shown once: only a hash is kept.\n\n` +
        `  username  ${result.username}\n  password  ${result.password}\n\n` +
        `The device may publish to millrace/${siteId}/${unitId}/telemetry and .../presence only.\n` +
        `On Mosquitto, export again (npx millrace device export-broker-auth --dir DIR) and reload it (SIGHUP).\n`,
    );
    return 0;
  } finally {
    await handle.close();
  }
}

async function revoke(args: string[], io: CliIo): Promise<number> {
  const { positionals } = parseOptions(args, {});
  if (positionals.length > 1) throw new AppError('bad-input', 'cli', `device revoke: unexpected argument "${positionals[1]}"`);
  const { siteId, unitId } = parseUnit(positionals[0]);
  const handle = await openCliDatabase();
  try {
    const live = createLivePublisher({ handle });
    const result = await revokeDeviceCredentials({ db: handle.db, viewer: LOCAL_VIEWER, siteId, unitId, live });
    await live.flush();
    if (!result.ok) throw new AppError(result.reason === 'not-found' ? 'not-found' : 'bad-input', 'cli', `${result.message} (${handle.location})`);
    io.stdout.write(
      result.revoked
        ? `MQTT account of unit ${siteId}/${unitId} revoked: it can no longer connect (device credentials issues a new password).\n` +
            `On Mosquitto, export again (npx millrace device export-broker-auth --dir DIR) and reload it (SIGHUP).\n`
        : `Unit ${siteId}/${unitId} has no MQTT account to revoke.\n`,
    );
    return 0;
  } finally {
    await handle.close();
  }
}

async function exportBrokerAuth(args: string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseOptions(args, { dir: { type: 'string', required: true } });
  if (positionals.length > 0) throw new AppError('bad-input', 'cli', `device export-broker-auth: unexpected argument "${positionals[0]}"`);
  const dir = values.dir!;
  if (dir.trim() === '') throw new AppError('bad-input', 'cli', '--dir: expected a folder, got an empty value');
  const config = getConfig();
  const handle = await openCliDatabase();
  try {
    const devices = await listBrokerAccounts({ db: handle.db });
    const ingester = ingesterAccount({ username: config.MQTT_USERNAME, password: config.MQTT_PASSWORD, devices });
    const { passwordFile, aclFile } = writeBrokerAuthFiles({ dir, accounts: ingester ? [ingester, ...devices] : devices });
    io.stdout.write(
      `${passwordFile} and ${aclFile} written: ${devices.length} unit${devices.length === 1 ? '' : 's'}` +
        `${ingester ? ` and the ingesters' account ${ingester.username}` : ''} (${handle.location}).\n` +
        `Reload Mosquitto to read them (docker compose kill -s SIGHUP mosquitto).\n`,
    );
    if (!ingester) {
      io.stderr.write('warning: MQTT_USERNAME and MQTT_PASSWORD are not set, so the files hold no ingesters\' account and no ingester can subscribe\n');
    }
    return 0;
  } finally {
    await handle.close();
  }
}

export async function run(args: string[], io: CliIo): Promise<number> {
  const [sub, ...rest] = args;
  switch (sub) {
    case 'credentials':
      return credentials(rest, io);
    case 'revoke':
      return revoke(rest, io);
    case 'export-broker-auth':
      return exportBrokerAuth(rest, io);
    default:
      throw new AppError(
        'bad-input',
        'cli',
        `expected "device credentials SITE/UNIT", "device revoke SITE/UNIT" or "device export-broker-auth --dir DIR", got "device ${args.join(' ')}"`,
      );
  }
}
