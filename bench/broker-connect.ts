/**
 * What signing in costs a broker. Prints figures; asserts nothing.
 *   - the $7$ hash check alone (PBKDF2-HMAC-SHA512) at our 101 iterations and,
 *     for comparison, 1,000 and 10,000;
 *   - a device's connect to the embedded broker (aedes with the product's
 *     authoriser on an in-memory PGlite), CONNECT to CONNACK, one at a time:
 *     cold (each unit's first, so a database read and PBKDF2) and cached
 *     (the same units again within the minute);
 *   - the same on a Mosquitto started from the shipped configuration with the
 *     files `device export-broker-auth` writes (it checks the hash every time),
 *     when a mosquitto binary is found.
 *
 *   npm run bench:connect [-- UNITS]   (default 200 units)
 */
import { execFileSync } from 'node:child_process';
import { chownSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import mqtt from 'mqtt';
import { openDatabase } from '@/db/client';
import { LOCAL_VIEWER } from '@/lib/auth/viewer';
import { startEmbeddedBroker } from '@/lib/broker/embedded';
import { createBrokerAuthoriser, newLocalIngesterAccount } from '@/lib/devices/broker-auth';
import { writeBrokerAuthFiles } from '@/lib/devices/broker-files';
import { hashPassword, newPassword, verifyPassword } from '@/lib/devices/credentials';
import { issueDeviceCredentials, listBrokerAccounts } from '@/lib/devices/queries';
import { freePort } from '@/lib/net/ports';
import { registerFleet, testFleet } from '@/test/support/ingest';
import { startMosquitto } from '@/test/support/mosquitto';
import { mosquitto } from '@/test/support/services';

const unitCount = Number(process.argv[2] ?? 200);
if (!Number.isInteger(unitCount) || unitCount < 1) throw new RangeError(`UNITS must be a whole number of at least 1, got ${process.argv[2]}`);

const quantile = (values: number[], q: number) => {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))]!;
};
const figures = (label: string, ms: number[]) =>
  process.stdout.write(`${label.padEnd(52)} p50 ${quantile(ms, 0.5).toFixed(2)} ms, p95 ${quantile(ms, 0.95).toFixed(2)} ms (${ms.length} runs)\n`);

async function connectMs(url: string, options: mqtt.IClientOptions): Promise<number> {
  const started = performance.now();
  const client = await mqtt.connectAsync(url, { reconnectPeriod: 0, clean: true, ...options });
  const ms = performance.now() - started;
  await client.endAsync();
  return ms;
}

const password = newPassword();
for (const iterations of [101, 1_000, 10_000]) {
  const stored = hashPassword(password, { iterations });
  const ms: number[] = [];
  for (let i = 0; i < (iterations > 1000 ? 50 : 300); i++) {
    const t = performance.now();
    await verifyPassword(password, stored);
    ms.push(performance.now() - t);
  }
  figures(`hash check, ${iterations} iterations`, ms);
}

const handle = await openDatabase({ dataDir: 'memory://' });
const fleet = testFleet('bench', { windUnits: unitCount, hydroUnits: 0 });
await registerFleet(handle, fleet);
const credentials = [];
for (const u of fleet.units) {
  const r = await issueDeviceCredentials({ db: handle.db, viewer: LOCAL_VIEWER, siteId: u.siteId, unitId: u.id });
  if (!r.ok) throw new Error(r.message);
  credentials.push({ clientId: `bench-${u.id}`, username: r.username, password: r.password });
}

const broker = await startEmbeddedBroker({ port: await freePort(), auth: createBrokerAuthoriser({ db: handle.db, localIngester: newLocalIngesterAccount() }) });
const cold: number[] = [];
for (const c of credentials) cold.push(await connectMs(broker.url, c));
const cached: number[] = [];
for (const c of credentials) cached.push(await connectMs(broker.url, c));
figures('embedded broker, first connect (db + PBKDF2)', cold);
figures('embedded broker, connect again (cached)', cached);
await broker.close();

if (mosquitto.available) {
  const dir = mkdtempSync(join(tmpdir(), 'millrace-bench-auth-'));
  const files = writeBrokerAuthFiles({ dir, accounts: await listBrokerAccounts({ db: handle.db }) });
  if (process.getuid?.() === 0) {
    const uid = Number(execFileSync('id', ['-u', 'mosquitto'], { encoding: 'utf8' }).trim());
    const gid = Number(execFileSync('id', ['-g', 'mosquitto'], { encoding: 'utf8' }).trim());
    for (const f of [dir, files.passwordFile, files.aclFile]) chownSync(f, uid, gid);
  }
  const m = await startMosquitto({ auth: files });
  const ms: number[] = [];
  for (const c of credentials) ms.push(await connectMs(m.url, { ...c, protocolVersion: 5 }));
  figures(`Mosquitto ${unitCount} accounts, connect (PBKDF2 each time)`, ms);
  await m.dispose();
  rmSync(dir, { recursive: true, force: true });
} else {
  process.stdout.write(`Mosquitto: not measured (${mosquitto.missing})\n`);
}
await handle.close();
