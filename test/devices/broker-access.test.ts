/**
 * Each device publishes only as itself: tried from the outside on the
 * embedded broker (aedes, with the product's authoriser on a real database)
 * and on a Mosquitto configured from the files `device export-broker-auth`
 * writes, each with the ingester running so that "nothing stored" is checked
 * where it matters, in the samples table and in quarantine.
 */
import { execFileSync } from 'node:child_process';
import { chownSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import mqtt, { type IClientOptions, type MqttClient } from 'mqtt';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { LOCAL_VIEWER } from '@/lib/auth/viewer';
import type { BrokerAuthoriser } from '@/lib/broker/access';
import { startEmbeddedBroker, type EmbeddedBroker } from '@/lib/broker/embedded';
import { createBrokerAuthoriser, cutOffOnCredentialChange, newLocalIngesterAccount } from '@/lib/devices/broker-auth';
import { ingesterAccount, writeBrokerAuthFiles } from '@/lib/devices/broker-files';
import { newPassword } from '@/lib/devices/credentials';
import { issueDeviceCredentials, listBrokerAccounts, revokeDeviceCredentials } from '@/lib/devices/queries';
import { startIngester, type Ingester } from '@/lib/ingest/ingester';
import { createLiveHub } from '@/lib/live/hub';
import { startLiveListener, type LiveListener } from '@/lib/live/listener';
import { createLivePublisher } from '@/lib/live/publisher';
import { freePort } from '@/lib/net/ports';
import { createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { queryRows, registerFleet, testFleet, testLogger, testTag, waitFor } from '@/test/support/ingest';
import { startMosquitto, type TestMosquitto } from '@/test/support/mosquitto';
import { mosquitto, skipUnless } from '@/test/support/services';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 2, hydroUnits: 1 });
const [unitA, unitB, unitC] = fleet.units as [(typeof fleet.units)[0], (typeof fleet.units)[0], (typeof fleet.units)[0]];
const topic = (u: { siteId: string; id: string }, leaf = 'telemetry') => `millrace/${u.siteId}/${u.id}/${leaf}`;
let tsBase = Date.now() - 120_000;
const sample = () => JSON.stringify({ ts: (tsBase += 1000), rpm: 250, vab: 231, vbc: 230, vca: 232, kw: 3 });

type Attempt = { client: MqttClient } | { refused: string };

/** Connects once (no reconnects); resolves with the client or with why it was refused. */
function tryConnect(url: string, options: IClientOptions): Promise<Attempt> {
  return new Promise((resolve) => {
    const client = mqtt.connect(url, { reconnectPeriod: 0, connectTimeout: 5000, clean: true, ...options });
    client.once('connect', () => resolve({ client }));
    client.once('error', (error: Error & { code?: number | string }) => {
      client.end(true);
      resolve({ refused: String(error.code ?? error.message) });
    });
    client.once('close', () => {
      if (!client.connected) resolve({ refused: 'closed' });
    });
  });
}

async function connected(url: string, options: IClientOptions): Promise<MqttClient> {
  const attempt = await tryConnect(url, options);
  if (!('client' in attempt)) throw new Error(`${options.username ?? 'anonymous'} refused: ${attempt.refused}`);
  attempt.client.on('error', () => {});
  return attempt.client;
}

/** Publishes at QoS 1; resolves 'acked', 'refused' (a negative PUBACK) or 'closed' (the broker dropped the connection). */
function publishOnce(client: MqttClient, to: string, payload: string, retain = false): Promise<'acked' | 'refused' | 'closed'> {
  return new Promise((resolve) => {
    if (!client.connected) return resolve('closed');
    const onClose = () => resolve('closed');
    client.once('close', onClose);
    client.publish(to, payload, { qos: 1, retain }, (error) => {
      client.off('close', onClose);
      resolve(error ? (client.connected ? 'refused' : 'closed') : 'acked');
    });
  });
}

const closedSoon = (client: MqttClient) =>
  new Promise<boolean>((resolve) => {
    if (!client.connected) return resolve(true);
    const timer = setTimeout(() => resolve(false), 5000);
    client.once('close', () => {
      clearTimeout(timer);
      resolve(true);
    });
  });

async function storedFor(db: TestDatabase, unitId: string): Promise<{ samples: number; quarantined: number; presence: string | null }> {
  const [s] = await queryRows<{ n: number }>(db.handle, 'select count(*)::int as n from telemetry_samples t join units u on u.key = t.unit_key where u.id = $1', [unitId]);
  const [q] = await queryRows<{ n: number }>(db.handle, `select count(*)::int as n from quarantine where topic like $1 or unit_id = $2`, [`%/${unitId}/%`, unitId]);
  const [p] = await queryRows<{ presence: string | null }>(
    db.handle,
    'select us.presence from unit_status us join units u on u.key = us.unit_key where u.id = $1',
    [unitId],
  ).catch(() => [{ presence: null }]);
  return { samples: Number(s?.n ?? 0), quarantined: Number(q?.n ?? 0), presence: p?.presence ?? null };
}

/** The SUBACK's codes, one per filter (mqtt.js rejects when one is a refusal; the packet is on the error). */
async function subscribeCodes(client: MqttClient, filters: string[]): Promise<number[]> {
  try {
    return (await client.subscribeAsync(Object.fromEntries(filters.map((f) => [f, { qos: 1 as const }])))).map((g) => g.qos);
  } catch (error) {
    const granted = (error as { packet?: { granted?: number[] } }).packet?.granted;
    if (!granted) throw error;
    return granted.map((g) => (typeof g === 'number' ? g : (g as { qos: number }).qos));
  }
}

let db: TestDatabase;
const passwords = new Map<string, { username: string; password: string }>();

async function issue(u: { siteId: string; id: string }, live?: Parameters<typeof issueDeviceCredentials>[0]['live']) {
  const r = await issueDeviceCredentials({ db: db.handle.db, viewer: LOCAL_VIEWER, siteId: u.siteId, unitId: u.id, live });
  if (!r.ok) throw new Error(r.message);
  passwords.set(u.id, { username: r.username, password: r.password });
  return r;
}
const creds = (u: { id: string }) => passwords.get(u.id)!;

beforeAll(async () => {
  db = await createTestDatabase();
  await registerFleet(db.handle, fleet);
  for (const u of [unitA, unitB, unitC]) await issue(u);
});
afterAll(async () => {
  await db?.drop();
});

describe('the embedded broker with the product\'s authoriser', () => {
  let broker: EmbeddedBroker;
  let ingester: Ingester;
  let verifications = 0;
  const hub = createLiveHub();
  const localIngester = newLocalIngesterAccount();
  const ingestClientId = `access-${tag}`;
  let url: string;
  let stopCutOff: () => void;
  let listener: LiveListener;

  beforeAll(async () => {
    const real = createBrokerAuthoriser({ db: db.handle.db, localIngester });
    const counting: BrokerAuthoriser = { verify: (u, p) => ((verifications += 1), real.verify(u, p)) };
    broker = await startEmbeddedBroker({ port: await freePort(), auth: counting, log: testLogger('broker') });
    url = broker.url;
    // As the product wires it: changes reach the hub in-process on PGlite, by NOTIFY/LISTEN on PostgreSQL.
    listener = await startLiveListener({ handle: db.handle, hub });
    stopCutOff = cutOffOnCredentialChange(hub, broker);
    ingester = await startIngester({
      handle: db.handle,
      brokerUrl: url,
      mqtt5: false,
      shareGroup: `g-${tag}`,
      clientId: ingestClientId,
      connections: 1,
      batchSamples: 100,
      batchMs: 20,
      bufferSamples: 10_000,
      log: testLogger(),
      ...localIngester,
    });
    await ingester.ready();
  });
  afterAll(async () => {
    stopCutOff?.();
    await listener?.stop();
    await ingester?.stop();
    await broker?.close();
  });

  it('refuses anonymous clients, unknown usernames and wrong passwords', async () => {
    expect(await tryConnect(url, { clientId: `anon-${tag}` })).toEqual({ refused: '5' });
    expect(await tryConnect(url, { clientId: `anon2-${tag}`, username: creds(unitA).username })).toEqual({ refused: '5' });
    expect(await tryConnect(url, { clientId: `who-${tag}`, username: 'nobody.nothing', password: newPassword() })).toEqual({ refused: '4' });
    expect(await tryConnect(url, { clientId: `wrong-${tag}`, username: creds(unitA).username, password: creds(unitB).password })).toEqual({ refused: '4' });
    // The ingester's in-memory account is not a device's: its password does not open a unit.
    expect(await tryConnect(url, { clientId: `mix-${tag}`, username: creds(unitA).username, password: localIngester.password })).toEqual({ refused: '4' });
  });

  it('stores nothing a device publishes to another unit\'s topics, and what it publishes to its own', async () => {
    const before = { b: await storedFor(db, unitB.id), c: await storedFor(db, unitC.id) };
    for (const [to, retain] of [
      [topic(unitB), false],
      [topic(unitB, 'presence'), true],
      [topic(unitC), false],
      [`millrace/${unitA.siteId}/${unitA.id}/anything`, false],
      [`$SYS/broker/x`, false],
    ] as const) {
      const a = await connected(url, { clientId: `a-${tag}`, ...creds(unitA) });
      expect(await publishOnce(a, to, to.endsWith('presence') ? 'offline' : sample(), retain), to).toBe('closed');
      a.end(true);
    }
    // Then its own sample, which is stored: the pipeline ran, and had the others come through they would be there too.
    const a = await connected(url, { clientId: `a-${tag}`, ...creds(unitA) });
    expect(await publishOnce(a, topic(unitA), sample())).toBe('acked');
    expect(await publishOnce(a, topic(unitA, 'presence'), 'online', true)).toBe('acked');
    await waitFor('unit A\'s own sample stored', async () => (await storedFor(db, unitA.id)).samples >= 1, { timeoutMs: 15_000 });
    await a.endAsync();
    expect(await storedFor(db, unitB.id)).toEqual(before.b);
    expect(await storedFor(db, unitC.id)).toEqual(before.c);
    expect(before.b.samples + before.b.quarantined).toBe(0);
  });

  it('lets a device subscribe to nothing, and refuses a last will on another unit\'s topic', async () => {
    const a = await connected(url, { clientId: `a-sub-${tag}`, ...creds(unitA) });
    expect(await subscribeCodes(a, ['millrace/+/+/telemetry', topic(unitB), topic(unitA), '#', `$share/x/millrace/+/+/telemetry`])).toEqual([128, 128, 128, 128, 128]);
    await a.endAsync();
    const will = await tryConnect(url, { clientId: `a-will-${tag}`, ...creds(unitA), will: { topic: topic(unitB, 'presence'), payload: Buffer.from('offline'), qos: 1, retain: true } });
    expect(will).toEqual({ refused: '5' });
    const own = await connected(url, { clientId: `a-will-${tag}`, ...creds(unitA), will: { topic: topic(unitA, 'presence'), payload: Buffer.from('offline'), qos: 1, retain: true } });
    await own.endAsync();
  });

  it('lets the ingester account publish nothing', async () => {
    const before = await storedFor(db, unitA.id);
    const i = await connected(url, { clientId: `i-${tag}`, ...localIngester });
    expect(await publishOnce(i, topic(unitA), sample())).toBe('closed');
    i.end(true);
    const a = await connected(url, { clientId: `a-${tag}`, ...creds(unitA) });
    expect(await publishOnce(a, topic(unitA), sample())).toBe('acked');
    await a.endAsync();
    await waitFor('the device\'s next sample stored', async () => (await storedFor(db, unitA.id)).samples >= before.samples + 1, { timeoutMs: 15_000 });
    expect((await storedFor(db, unitA.id)).samples).toBe(before.samples + 1);
  });

  it('refuses a device that takes another account\'s client id (the ingester\'s session)', async () => {
    expect(await tryConnect(url, { clientId: `${ingestClientId}-0`, clean: false, ...creds(unitB) })).toEqual({ refused: '2' });
    expect(ingester.state().broker.connected).toBeGreaterThanOrEqual(1);
  });

  it('cuts off a device whose password is rotated, refuses the old password (though it was cached) and takes the new one', async () => {
    const old = creds(unitA);
    const first = await connected(url, { clientId: `rot-${tag}`, ...old });
    const second = await connected(url, { clientId: `rot2-${tag}`, ...old });
    first.end(true);
    const calls = verifications;
    // A cached check: no second PBKDF2 for the same password within the minute.
    const third = await connected(url, { clientId: `rot3-${tag}`, ...old });
    expect(verifications).toBe(calls);
    await issue(unitA, createLivePublisher({ handle: db.handle, hub }));
    expect(await closedSoon(second)).toBe(true);
    expect(await closedSoon(third)).toBe(true);
    expect(await tryConnect(url, { clientId: `rot4-${tag}`, ...old })).toEqual({ refused: '4' });
    const fresh = await connected(url, { clientId: `rot5-${tag}`, ...creds(unitA) });
    expect(await publishOnce(fresh, topic(unitA), sample())).toBe('acked');
    await fresh.endAsync();
  });

  it('cuts off and refuses a revoked device', async () => {
    const b = await connected(url, { clientId: `rev-${tag}`, ...creds(unitB) });
    const r = await revokeDeviceCredentials({ db: db.handle.db, viewer: LOCAL_VIEWER, siteId: unitB.siteId, unitId: unitB.id, live: createLivePublisher({ handle: db.handle, hub }) });
    expect(r).toEqual({ ok: true, revoked: true });
    expect(await closedSoon(b)).toBe(true);
    expect(await tryConnect(url, { clientId: `rev-${tag}`, ...creds(unitB) })).toEqual({ refused: '4' });
    await issue(unitB);
  });

  it('refuses to start without an authoriser', async () => {
    await expect(startEmbeddedBroker({ port: await freePort(), auth: undefined as never })).rejects.toThrow(/needs an authoriser/);
  });
});

describe.skipIf(skipUnless(mosquitto, 'device access on Mosquitto configured from the exported files'))('Mosquitto configured from export-broker-auth', () => {
  let broker: TestMosquitto;
  let ingester: Ingester;
  let url: string;
  const dir = mkdtempSync(join(tmpdir(), 'millrace-broker-auth-'));
  const ingest = { username: 'millrace-ingest', password: `${newPassword()}${newPassword()}` };

  const exportFiles = async () => {
    const devices = await listBrokerAccounts({ db: db.handle.db });
    const files = writeBrokerAuthFiles({ dir, accounts: [ingesterAccount({ ...ingest, devices })!, ...devices] });
    // Started as root, Mosquitto drops to the user "mosquitto" before it reads the files (as the container's uid 1883 does).
    if (process.getuid?.() === 0) {
      try {
        const uid = Number(execFileSync('id', ['-u', 'mosquitto'], { encoding: 'utf8' }).trim());
        const gid = Number(execFileSync('id', ['-g', 'mosquitto'], { encoding: 'utf8' }).trim());
        for (const f of [dir, files.passwordFile, files.aclFile]) chownSync(f, uid, gid);
      } catch {
        // No such user: it runs as root and reads them anyway.
      }
    }
    return files;
  };

  beforeAll(async () => {
    broker = await startMosquitto({ auth: await exportFiles() });
    url = broker.url;
    ingester = await startIngester({
      handle: db.handle,
      brokerUrl: url,
      mqtt5: true,
      shareGroup: `g-${tag}`,
      clientId: `access-m-${tag}`,
      connections: 2,
      batchSamples: 100,
      batchMs: 20,
      bufferSamples: 10_000,
      log: testLogger(),
      sessionExpirySeconds: 60,
      ...ingest,
    });
    // Resolves only once each connection's $share/... subscription was granted under the ACL's read lines.
    await ingester.ready();
  });
  afterAll(async () => {
    await ingester?.stop();
    await broker?.dispose();
    rmSync(dir, { recursive: true, force: true });
  });

  const v5 = { protocolVersion: 5 as const };

  it('refuses anonymous clients and wrong passwords', async () => {
    const anon = await tryConnect(url, { ...v5, clientId: `anon-${tag}` });
    expect('refused' in anon && ['135', '134'].includes(anon.refused)).toBe(true);
    const wrong = await tryConnect(url, { ...v5, clientId: `w-${tag}`, username: creds(unitA).username, password: creds(unitB).password });
    expect('refused' in wrong && ['135', '134'].includes(wrong.refused)).toBe(true);
  });

  it('stores nothing a device publishes to another unit\'s topics, and what it publishes to its own', async () => {
    const before = { b: await storedFor(db, unitB.id), c: await storedFor(db, unitC.id), a: await storedFor(db, unitA.id) };
    // Mosquitto 2.0.11 answers a publish the ACL denies with a refusing PUBACK (0x87) or drops the connection;
    // what counts is that nothing is stored. A fresh connection per attempt.
    for (const [to, payload, retain] of [
      [topic(unitB), sample(), false],
      [topic(unitC), sample(), false],
      [`millrace/${unitA.siteId}/${unitA.id}/anything`, sample(), false],
      [topic(unitB, 'presence'), 'offline', true],
    ] as const) {
      const a = await connected(url, { ...v5, clientId: `ma-${tag}`, ...creds(unitA) });
      expect(await publishOnce(a, to, payload, retain), to).not.toBe('acked');
      a.end(true);
    }
    const a2 = await connected(url, { ...v5, clientId: `ma2-${tag}`, ...creds(unitA) });
    expect(await publishOnce(a2, topic(unitA), sample())).toBe('acked');
    await waitFor('unit A\'s own sample stored through Mosquitto', async () => (await storedFor(db, unitA.id)).samples > before.a.samples, { timeoutMs: 15_000 });
    await a2.endAsync();
    expect(await storedFor(db, unitB.id)).toEqual(before.b);
    expect(await storedFor(db, unitC.id)).toEqual(before.c);
  });

  it('lets a device read nothing, and the ingester account publish nothing', async () => {
    // Mosquitto 2.0.11 grants the SUBSCRIBE itself (code 1) but checks read access on every message it would deliver:
    // a device subscribed to everything receives nothing, while the ingester receives (and stores) the same message.
    const a = await connected(url, { ...v5, clientId: `ms-${tag}`, ...creds(unitA) });
    const heard: string[] = [];
    a.on('message', (t) => heard.push(t));
    const codes = await subscribeCodes(a, ['millrace/+/+/telemetry', topic(unitB), '#', '$share/x/millrace/+/+/telemetry']);
    process.stdout.write(`mosquitto: SUBACK codes of a device's subscriptions ${codes.join(', ')}\n`);
    const beforeB = await storedFor(db, unitB.id);
    const b = await connected(url, { ...v5, clientId: `mb-${tag}`, ...creds(unitB) });
    expect(await publishOnce(b, topic(unitB), sample())).toBe('acked');
    expect(await publishOnce(b, topic(unitB, 'presence'), 'online', true)).toBe('acked');
    await b.endAsync();
    await waitFor('unit B\'s sample stored (so the broker routed it)', async () => (await storedFor(db, unitB.id)).samples > beforeB.samples, { timeoutMs: 15_000 });
    await a.endAsync();
    expect(heard).toEqual([]);
    const before = await storedFor(db, unitA.id);
    const i = await connected(url, { ...v5, clientId: `mi-${tag}`, ...ingest });
    await publishOnce(i, topic(unitA), sample());
    i.end(true);
    const a2 = await connected(url, { ...v5, clientId: `ms2-${tag}`, ...creds(unitA) });
    expect(await publishOnce(a2, topic(unitA), sample())).toBe('acked');
    await a2.endAsync();
    await waitFor('the device\'s next sample stored', async () => (await storedFor(db, unitA.id)).samples >= before.samples + 1, { timeoutMs: 15_000 });
    expect((await storedFor(db, unitA.id)).samples).toBe(before.samples + 1);
  });

  it('refuses a rotated password once exported and reloaded, and takes the new one', async () => {
    const old = creds(unitC);
    await connected(url, { ...v5, clientId: `mr-${tag}`, ...old }).then((c) => c.endAsync());
    await issue(unitC);
    await exportFiles();
    broker.reload();
    await waitFor('Mosquitto to refuse the old password', async () => 'refused' in (await tryConnect(url, { ...v5, clientId: `mr-${tag}`, ...old })), { timeoutMs: 10_000 });
    const fresh = await connected(url, { ...v5, clientId: `mr2-${tag}`, ...creds(unitC) });
    expect(await publishOnce(fresh, topic(unitC), sample())).toBe('acked');
    await fresh.endAsync();
  });
});
