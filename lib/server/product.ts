/**
 * The whole product in one Node process (`npm start`): database, MQTT broker
 * (embedded unless MQTT_URL is set), ingester, live diagnosis, demo fleet and
 * the web app. On embedded defaults everything must share one process: a
 * PGlite folder may be opened by one process only.
 *
 * With `--role web` only the database and the web app run (`npm run web`, as
 * in docker-compose, where the ingester is its own service).
 */
import { provideDemoStatus } from '@/lib/fleet/demo-status';
import { sql } from 'drizzle-orm';
import { loadConfig, type Config } from '@/lib/config/env';
import { AppError } from '@/lib/errors/app-error';
import { createLogger, type Logger } from '@/lib/log/logger';
import { getDatabase, closeDatabase, redactUrl, rowsOf, type DatabaseHandle } from '@/db/client';
import { registerComponent } from './registry';
import { startWebServer } from './next-app';
import { createLivePublisher, type LivePublisher } from '@/lib/live/publisher';
import { getLiveHub } from '@/lib/live/hub';
import { ensureLiveListener, stopLiveListener } from '@/lib/live/listener';

type Stoppable = { name: string; stop(): Promise<void> };

async function databaseComponent(handle: DatabaseHandle) {
  registerComponent('database', {
    state: async () => {
      const started = performance.now();
      try {
        await handle.db.execute(sql`select 1`);
        return { status: 'ok', backend: handle.backend, location: handle.location, pingMs: Math.round(performance.now() - started) };
      } catch (error) {
        return { status: 'down', backend: handle.backend, location: handle.location, error: (error as Error).message };
      }
    },
  });
}

async function startPipeline(config: Config, handle: DatabaseHandle, log: Logger, stack: Stoppable[]): Promise<void> {
  let brokerUrl = config.MQTT_URL;
  let mqtt5 = true;
  // Broker credentials of the ingester: MQTT_USERNAME/MQTT_PASSWORD on an outside broker, an in-memory account on the embedded one.
  let ingesterCredentials = { username: config.MQTT_USERNAME, password: config.MQTT_PASSWORD };
  let embedded = false;
  if (brokerUrl === undefined) {
    const { startEmbeddedBroker } = await import('@/lib/broker/embedded');
    const { createBrokerAuthoriser, cutOffOnCredentialChange, newLocalIngesterAccount } = await import('@/lib/devices/broker-auth');
    const localIngester = newLocalIngesterAccount();
    const broker = await startEmbeddedBroker({
      port: config.MQTT_PORT,
      log: log.child('broker'),
      auth: createBrokerAuthoriser({ db: handle.db, localIngester }),
    });
    stack.push({ name: 'broker', stop: () => broker.close() });
    // A rotated or revoked device is cut off at once: the live feed carries the change (in-process, or NOTIFY from a command).
    const unsubscribe = cutOffOnCredentialChange(getLiveHub(), broker);
    stack.push({ name: 'broker credentials', stop: async () => unsubscribe() });
    ingesterCredentials = localIngester;
    embedded = true;
    registerComponent('broker', { state: () => ({ status: 'ok', embedded: true, url: broker.url, clients: broker.clients() }) });
    brokerUrl = broker.url;
    mqtt5 = false;
  } else {
    registerComponent('broker', { state: () => ({ status: 'ok', embedded: false, url: redactUrl(config.MQTT_URL!) }) });
  }

  // Workers publish to the live feed; the host registers them for /api/health.
  const live = createLivePublisher({ handle, log: log.child('live') });
  const { startIngester } = await import('@/lib/ingest/ingester');
  const ingester = await startIngester({
    live,
    handle,
    brokerUrl,
    mqtt5,
    clientId: config.INGEST_CLIENT_ID,
    shareGroup: config.INGEST_SHARE_GROUP,
    connections: config.INGEST_CONNECTIONS,
    batchSamples: config.INGEST_BATCH_SAMPLES,
    batchMs: config.INGEST_BATCH_MS,
    bufferSamples: config.INGEST_BUFFER_SAMPLES,
    retentionDays: config.RETENTION_DAYS,
    ...ingesterCredentials,
    log: log.child('ingest'),
  });
  stack.push({ name: 'ingester', stop: () => ingester.stop() });
  registerComponent('ingester', { state: () => ingester.state() });
  registerLivePublisher(live);

  const { startDiagnosisWorker } = await import('@/lib/diagnosis/worker');
  const diagnosis = startDiagnosisWorker({
    db: handle.db,
    intervalS: config.DIAGNOSIS_INTERVAL_S,
    windowHours: config.DIAGNOSIS_WINDOW_HOURS,
    log: log.child('diagnosis'),
    live,
  });
  stack.push({ name: 'diagnosis', stop: async () => diagnosis() });

  const { startAlertWorkers } = await import('@/lib/alerts/workers');
  stack.push({ name: 'alerts', stop: startAlertWorkers({ db: handle.db, config, log, live }) });

  if (config.DEMO) await startDemo(config, handle, brokerUrl, log, stack, embedded);
  else {
    registerComponent('demo', { state: () => ({ status: 'off', reason: 'DEMO=off' }) });
    provideDemoStatus(() => ({ status: 'off' }));
  }
}

let publisherState: LivePublisher['state'] | undefined;

function registerLivePublisher(live: LivePublisher) {
  publisherState = () => live.state();
}

/** The live feed in /api/health: how events reach this process and how many pages listen. */
async function liveComponent(handle: DatabaseHandle, log: Logger, stack: Stoppable[]) {
  const listener = await ensureLiveListener(handle, log.child('live'));
  stack.push({ name: 'live feed', stop: () => stopLiveListener() });
  registerComponent('live', {
    state: () => {
      const heard = listener.state();
      const hub = getLiveHub();
      return {
        status: heard.listening ? 'ok' : 'degraded',
        ...(heard.listening ? {} : { reason: 'not listening for changes: open pages do not update' }),
        source: heard,
        publisher: publisherState?.(),
        openStreams: hub.openStreams(),
        lastEventId: hub.currentId(),
      };
    },
  });
}

async function startDemo(config: Config, handle: DatabaseHandle, brokerUrl: string, log: Logger, stack: Stoppable[], embedded: boolean) {
  const { demoFleet } = await import('@/lib/simulate/demo-fleet');
  const { startSimulator, backfill } = await import('@/lib/simulate/simulator');
  const { upsertFleet } = await import('@/lib/setup/queries');
  await upsertFleet({ db: handle.db, fleet: demoFleet });
  if (handle.backend === 'pglite') {
    // Embedded demo with nobody yet: an admin whose one-time password goes to the console (lib/auth/demo-admin.ts).
    const { ensureDemoAdmin, demoAdminLines } = await import('@/lib/auth/demo-admin');
    const admin = await ensureDemoAdmin({ db: handle.db });
    if (admin) process.stdout.write(demoAdminLines(admin));
  }
  const simLog = log.child('demo');
  const hasHistory = await hasSamples(handle);
  const credentials = {
    username: config.MQTT_USERNAME,
    password: config.MQTT_PASSWORD,
    // On the embedded broker each demo unit signs in as itself, with credentials issued now the way an operator issues them.
    ...(embedded ? { credentialsFor: await issueDemoCredentials(config, handle, demoFleet.units, simLog) } : {}),
  };
  let phase = hasHistory ? 'live' : 'backfilling history';
  const simulator = await startSimulator({ brokerUrl, fleet: demoFleet, log: simLog, ...credentials });
  stack.push({ name: 'demo', stop: () => simulator.stop() });
  registerComponent('demo', { state: () => ({ status: 'ok', phase, ...simulator.state() }) });
  provideDemoStatus(() => ({ status: 'ok', phase }));
  stack.push({ name: 'demo status', stop: async () => provideDemoStatus(undefined) });
  if (!hasHistory) {
    // History goes through the broker like everything else; the page works meanwhile.
    backfill({ brokerUrl, fleet: demoFleet, days: 3, log: simLog, ...credentials })
      .then(() => {
        phase = 'live';
      })
      .catch((error: unknown) => {
        phase = 'live (history failed)';
        simLog.error('demo history failed', { error });
      });
  }
}

/**
 * Issues (rotates) each demo unit's device credentials through lib/devices, as
 * the setup screen does, and writes them to DATA_DIR/demo-device-credentials.json
 * (mode 0600), so that a person trying the demo can publish as a demo unit
 * from outside (mosquitto_pub). Demo units only; rewritten at each start.
 */
async function issueDemoCredentials(config: Config, handle: DatabaseHandle, units: ReadonlyArray<{ siteId: string; id: string }>, log: Logger) {
  const { issueDeviceCredentials } = await import('@/lib/devices/queries');
  const { LOCAL_VIEWER } = await import('@/lib/auth/viewer');
  const { mkdirSync, writeFileSync, chmodSync } = await import('node:fs');
  const { join } = await import('node:path');
  const issued = new Map<string, { username: string; password: string }>();
  for (const unit of units) {
    const result = await issueDeviceCredentials({ db: handle.db, viewer: LOCAL_VIEWER, siteId: unit.siteId, unitId: unit.id, audit: false });
    if (result.ok) issued.set(`${unit.siteId}/${unit.id}`, { username: result.username, password: result.password });
  }
  try {
    mkdirSync(config.DATA_DIR, { recursive: true });
    const file = join(config.DATA_DIR, DEMO_CREDENTIALS_FILE);
    writeFileSync(file, `${JSON.stringify(Object.fromEntries(issued), null, 2)}\n`, { mode: 0o600 });
    chmodSync(file, 0o600);
  } catch (error) {
    log.warn('could not write the demo units\' credentials file', { error });
  }
  return (siteId: string, unitId: string) => issued.get(`${siteId}/${unitId}`);
}

/** File in DATA_DIR with the demo units' MQTT usernames and passwords (embedded broker only). */
export const DEMO_CREDENTIALS_FILE = 'demo-device-credentials.json';

async function hasSamples(handle: DatabaseHandle): Promise<boolean> {
  const rows = rowsOf<{ has: boolean }>(await handle.db.execute(sql`select exists(select 1 from telemetry_samples) as has`));
  return rows[0]?.has === true;
}

/** Starts the product; resolves once it serves. Returns a function that stops it. */
export async function startProduct({ role, env = process.env }: { role: 'all' | 'web'; env?: NodeJS.ProcessEnv }) {
  const config = loadConfig(env);
  const log = createLogger('server', config.LOG_LEVEL);
  const stack: Stoppable[] = [];
  const stop = async () => {
    for (const part of stack.reverse()) {
      try {
        await part.stop();
      } catch (error) {
        log.warn('stop failed', { part: part.name, error });
      }
    }
    await closeDatabase();
  };
  try {
    const handle = await getDatabase({ url: config.DATABASE_URL, dataDir: config.DATA_DIR });
    await databaseComponent(handle);
    await liveComponent(handle, log, stack);
    if (role === 'all') await startPipeline(config, handle, log, stack);
    else {
      if (handle.backend === 'pglite') {
        log.warn('web only on the embedded database: no ingester can share its folder; use npm start, or DATABASE_URL');
      }
      registerComponent('ingester', { state: () => ({ status: 'off', reason: 'runs as its own process (npm run ingest)' }) });
    }
    const web = await startWebServer({ host: config.HOST, port: config.PORT });
    stack.push({ name: 'web', stop: () => web.close() });
    return { url: web.url, config, log, stop, backend: handle.backend };
  } catch (error) {
    await stop();
    throw error;
  }
}

/** Runs the product until a signal stops it; prints the URL or one line saying why it cannot start. */
export async function runProduct(role: 'all' | 'web'): Promise<void> {
  let running: Awaited<ReturnType<typeof startProduct>>;
  try {
    running = await startProduct({ role });
  } catch (error) {
    const message = error instanceof AppError || (error as Error).name === 'AppError' ? (error as Error).message : (error as Error).stack;
    process.stderr.write(`millrace: ${message}\n`);
    process.exit(2);
  }
  const { url, config, backend, log } = running;
  const embedded = backend === 'pglite' ? `embedded database in ${config.DATA_DIR}` : 'PostgreSQL';
  const broker = config.MQTT_URL ? 'MQTT broker at MQTT_URL' : `embedded MQTT broker on 127.0.0.1:${config.MQTT_PORT}`;
  process.stdout.write(
    `millrace is running at ${url}\n  ${role === 'all' ? `${embedded}, ${broker}, demo fleet ${config.DEMO ? 'on' : 'off'}` : `web only, ${embedded}`}\n  press Ctrl+C to stop\n`,
  );
  let stopping = false;
  const shutdown = (signal: string) => {
    if (stopping) return;
    stopping = true;
    log.info('stopping', { signal });
    running
      .stop()
      .then(() => process.exit(0))
      .catch(() => process.exit(1));
    setTimeout(() => process.exit(1), 15_000).unref();
  };
  process.on('SIGINT', () => shutdown('SIGINT'));
  process.on('SIGTERM', () => shutdown('SIGTERM'));
}

