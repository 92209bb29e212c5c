/**
 * `npm run ingest`: the standalone ingester, plain Node. Reads the
 * configuration, opens the database, subscribes to MQTT_URL (an MQTT 5
 * broker such as Mosquitto 2) and runs until SIGINT or SIGTERM, when it
 * drains: commits what it holds, acknowledges it, disconnects, exits. The
 * live diagnosis runs in this process too.
 */
import { openDatabase } from '@/db/client';
import { getConfig } from '@/lib/config/env';
import { createLogger } from '@/lib/log/logger';
import { heapProblem } from './heap';
import { startIngester } from './ingester';
import { startAlertWorkers } from '@/lib/alerts/workers';
import { startDiagnosisWorker } from '@/lib/diagnosis/worker';
import { createLivePublisher } from '@/lib/live/publisher';

async function main(): Promise<number> {
  let config;
  try {
    config = getConfig();
  } catch (error) {
    process.stderr.write(`millrace ingest: ${(error as Error).message}\n`);
    return 2;
  }
  const log = createLogger('ingest', config.LOG_LEVEL);
  if (!config.MQTT_URL) {
    process.stderr.write(
      'millrace ingest: the standalone ingester needs MQTT_URL, the address of an MQTT 5 broker such as Mosquitto ' +
        '(e.g. MQTT_URL=mqtt://127.0.0.1:1883); the embedded set-up, with its own broker and ingester inside the server, is `npm start`\n',
    );
    return 2;
  }
  const heap = heapProblem(config.INGEST_BUFFER_SAMPLES, config.INGEST_BATCH_SAMPLES);
  if (heap) {
    process.stderr.write(`millrace ingest: ${heap}\n`);
    return 2;
  }
  const handle = await openDatabase({ url: config.DATABASE_URL, dataDir: config.DATA_DIR, maxConnections: 4 });
  // Open pages of the web process (npm run web) hear of new samples and diagnoses through NOTIFY.
  const live = createLivePublisher({ handle, log: log.child('live') });
  const ingester = await startIngester({
    live,
    handle,
    brokerUrl: config.MQTT_URL,
    mqtt5: true,
    clientId: config.INGEST_CLIENT_ID,
    shareGroup: config.INGEST_SHARE_GROUP,
    connections: config.INGEST_CONNECTIONS,
    batchSamples: config.INGEST_BATCH_SAMPLES,
    batchMs: config.INGEST_BATCH_MS,
    bufferSamples: config.INGEST_BUFFER_SAMPLES,
    username: config.MQTT_USERNAME,
    password: config.MQTT_PASSWORD,
    retentionDays: config.RETENTION_DAYS,
    log,
  });
  // The live diagnosis runs beside the ingester in production (docker-compose
  // has no service of its own for it): it reads what the ingester committed.
  const stopDiagnosis = startDiagnosisWorker({
    db: handle.db,
    intervalS: config.DIAGNOSIS_INTERVAL_S,
    windowHours: config.DIAGNOSIS_WINDOW_HOURS,
    log: log.child('diagnosis'),
    live,
  });
  // Alerts are evaluated beside the diagnosis, on what it and the ingester wrote.
  const stopAlerts = startAlertWorkers({ db: handle.db, config, log, live });
  const stopWorkers = () => Promise.all([stopDiagnosis(), stopAlerts()]);
  ingester.ready().catch(async () => {
    await stopWorkers();
    // The pool logged why (a refused subscription); nothing can be ingested.
    await ingester.abort();
    await handle.close();
    process.exit(1);
  });

  return new Promise<number>((resolve) => {
    let stopping = false;
    const onSignal = (signal: NodeJS.Signals) => {
      if (stopping) {
        log.warn('second signal: exiting without draining', { signal });
        process.exit(1);
      }
      stopping = true;
      log.info('draining before exit', { signal });
      void stopWorkers()
        .then(() => ingester.stop())
        .then(() => live.flush())
        .then(() => handle.close())
        .then(
          () => resolve(0),
          (error) => {
            log.error('draining failed', { error });
            resolve(1);
          },
        );
    };
    process.on('SIGINT', onSignal);
    process.on('SIGTERM', onSignal);
  });
}

main().then(
  (code) => process.exit(code),
  (error) => {
    process.stderr.write(`millrace ingest: ${error instanceof Error ? error.message : String(error)}\n`);
    process.exit(1);
  },
);
