/**
 * Benchmark of the ingest path. In one run it measures:
 *   - the raw ceiling: the same rows written straight into PostgreSQL by COPY;
 *   - end to end: samples published at QoS 1 (10 a message) through the broker
 *     to the ingester (`npm run ingest`, a separate process) until committed,
 *     with one ingester and with two on the shared subscription;
 *   - the ingester's peak resident memory, and bytes per stored row.
 * It makes a fresh database (on TEST_DATABASE_URL, else DATABASE_URL, else
 * the local PostgreSQL) and drops it at the end. The broker is MQTT_URL when
 * set, else a Mosquitto of its own started from the shipped configuration.
 * Prints figures; asserts nothing. The last line reads
 * `ingest: <E> samples/s end-to-end, <C> samples/s COPY ceiling, ratio <E/C>`.
 *
 *   npm run bench:ingest [-- SAMPLES [UNITS]]   (default 1,000,000 samples, 200 units)
 *
 * A million samples by default: a run of 300,000 lasts some 2.5 s end to end,
 * of which the last batch's wait and commit are a tenth, and its COPY ceiling
 * is a 0.8 s COPY into an empty table; neither is the steady state.
 *
 * The ingesters run as `npm run ingest` does, with its heap flags.
 * BENCH_INGEST_NODE_ARGS (space-separated) adds node flags to every ingester,
 * after the script's (e.g. `--cpu-prof --cpu-prof-dir=/tmp/prof`, or another
 * `--max-old-space-size`);
 * BENCH_INGEST_LOG_LEVEL (default info) and BENCH_INGEST_LOG_DIR keep the ingesters' logs.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import postgres from 'postgres';
import { openDatabase, type DatabaseHandle } from '@/db/client';
import { ensureMonthlyPartitions } from '@/db/partitions';
import { createPostgresDatabase } from '@/test/support/backend';
import { ingestCommand, openPublisher, registerFleet, spawnIngester, testFleet, type Outgoing } from '@/test/support/ingest';
import { startMosquitto, type TestMosquitto } from '@/test/support/mosquitto';

const samples = Number(process.argv[2] ?? 1_000_000);
const unitCount = Number(process.argv[3] ?? 200);
const SAMPLES_PER_MESSAGE = 10;
if (!Number.isInteger(samples) || samples < SAMPLES_PER_MESSAGE) throw new RangeError(`SAMPLES must be a whole number of at least 10, got ${process.argv[2]}`);
if (!Number.isInteger(unitCount) || unitCount < 1) throw new RangeError(`UNITS must be a whole number of at least 1, got ${process.argv[3]}`);
const messagesTotal = Math.floor(samples / SAMPLES_PER_MESSAGE);
const N = messagesTotal * SAMPLES_PER_MESSAGE;
const adminUrl = process.env.TEST_DATABASE_URL || process.env.DATABASE_URL || 'postgres://postgres@127.0.0.1:5432/postgres';

const logDir = process.env.BENCH_INGEST_LOG_DIR;
const nodeArgs = (process.env.BENCH_INGEST_NODE_ARGS ?? '').split(' ').filter(Boolean);
const say = (line: string) => process.stdout.write(`${line}\n`);
const fmt = (n: number) => Math.round(n).toLocaleString('en-US');

/** The bench fleet: wind units on a few sites (ids only matter to the ingester's unit check). */
const fleet = testFleet('bench', { windUnits: unitCount, hydroUnits: 0 });

/** Sample i of unit u: 1 s apart, values that vary. */
function sampleOf(u: number, i: number, start: number) {
  const k = u * 7 + i;
  return {
    ts: start + i * 1000,
    rpm: 180 + (k % 90) + 0.5,
    hz: 27 + (k % 13) / 2,
    vab: 225 + (k % 17) / 4,
    vbc: 224 + (k % 19) / 4,
    vca: 226 + (k % 23) / 4,
    ia: 9 + (k % 7) / 2,
    ib: 9.5 + (k % 5) / 2,
    ic: 8.5 + (k % 3) / 2,
    kw: 3 + (k % 29) / 8,
    statorC: 45 + (k % 11) / 2,
    windMs: 6 + (k % 31) / 5,
  };
}

const perUnit = Math.ceil(messagesTotal / unitCount) * SAMPLES_PER_MESSAGE;
const start = Math.floor((Date.now() - perUnit * 1000 - 3_600_000) / 1000) * 1000;

/** The messages of the run: unit by unit in turn, 10 consecutive samples each. */
function messages(): Outgoing[] {
  const out: Outgoing[] = [];
  for (let m = 0; out.length < messagesTotal; m++) {
    for (let u = 0; u < unitCount && out.length < messagesTotal; u++) {
      const unit = fleet.units[u]!;
      const batch = [];
      for (let j = 0; j < SAMPLES_PER_MESSAGE; j++) batch.push(sampleOf(u, m * SAMPLES_PER_MESSAGE + j, start));
      out.push({ topic: `millrace/${unit.siteId}/${unit.id}/telemetry`, payload: JSON.stringify(batch) });
    }
  }
  return out;
}

async function countRows(sql: postgres.Sql): Promise<number> {
  const [row] = await sql`select count(*)::int as n from telemetry_samples`;
  return Number(row!.n);
}

async function reset(sql: postgres.Sql) {
  await sql`truncate telemetry_samples, telemetry_rollups_10m, telemetry_rollups_daily, quarantine, unit_status`;
  await sql`vacuum analyze telemetry_samples`;
}

/**
 * COPY of the same rows, text format, straight from the sample objects (no
 * broker, no JSON, no validation, no rollups): what a client writing these
 * rows can reach. The samples are built before the clock starts; turning them
 * into COPY text is timed, as any writer must do it.
 */
async function copyCeiling(sql: postgres.Sql, keys: Map<string, number>, list: Outgoing[]): Promise<number> {
  const columns = ['unit_key', 'ts', 'rpm', 'hz', 'vab', 'vbc', 'vca', 'ia', 'ib', 'ic', 'kw', 'stator_c', 'wind_ms'];
  const rows: Array<{ unitKey: number; s: ReturnType<typeof sampleOf> }> = [];
  for (const m of list) {
    const unitKey = keys.get(m.topic.split('/')[2]!)!;
    for (const s of JSON.parse(m.payload as string) as Array<ReturnType<typeof sampleOf>>) rows.push({ unitKey, s });
  }
  const started = performance.now();
  const stream = await sql.unsafe(`copy telemetry_samples (${columns.join(', ')}) from stdin`).writable();
  let text = '';
  for (const { unitKey, s } of rows) {
    text += `${unitKey}\t${new Date(s.ts).toISOString()}\t${s.rpm}\t${s.hz}\t${s.vab}\t${s.vbc}\t${s.vca}\t${s.ia}\t${s.ib}\t${s.ic}\t${s.kw}\t${s.statorC}\t${s.windMs}\n`;
    if (text.length > 1 << 18) {
      if (!stream.write(text)) await new Promise((resolve) => stream.once('drain', resolve));
      text = '';
    }
  }
  if (text) stream.write(text);
  await new Promise<void>((resolve, reject) => {
    stream.once('finish', () => resolve());
    stream.once('error', reject);
    stream.end();
  });
  const seconds = (performance.now() - started) / 1000;
  const stored = await countRows(sql);
  if (stored !== N) throw new Error(`COPY stored ${stored} rows, expected ${N}`);
  return N / seconds;
}

function rssPeakMb(pid: number | undefined): number | undefined {
  if (!pid) return undefined;
  try {
    const status = readFileSync(`/proc/${pid}/status`, 'utf8');
    const hwm = /VmHWM:\s+(\d+) kB/.exec(status);
    return hwm ? Number(hwm[1]) / 1024 : undefined;
  } catch {
    return undefined;
  }
}

/** Publishes everything and waits until every sample is committed; returns samples/s and the ingesters' peak RSS. */
async function endToEnd(sql: postgres.Sql, dbUrl: string, brokerUrl: string, ingesters: number, list: Outgoing[], run: number) {
  const children: Array<ReturnType<typeof spawnIngester>> = [];
  for (let i = 0; i < ingesters; i++) {
    children.push(
      spawnIngester({
        DATABASE_URL: dbUrl,
        MQTT_URL: brokerUrl,
        INGEST_CLIENT_ID: `bench-${run}-${i}`,
        // A group per run: the sessions of an earlier run's ingesters stay in their group.
        INGEST_SHARE_GROUP: `millrace-bench-${run}`,
        LOG_LEVEL: process.env.BENCH_INGEST_LOG_LEVEL ?? 'info',
      }, nodeArgs),
    );
  }
  const subscribed = () => children.every((c) => (c.output().match(/"msg":"subscribed"/g) ?? []).length >= Number(process.env.INGEST_CONNECTIONS ?? 4));
  for (let waited = 0; !subscribed(); waited += 50) {
    if (waited > 60_000) throw new Error(`ingesters did not subscribe: ${children.map((c) => c.output()).join('\n')}`);
    await new Promise((resolve) => setTimeout(resolve, 50));
  }
  const publisher = await openPublisher(brokerUrl, { clientId: `bench-pub-${run}` });
  const started = performance.now();
  const publishing = publisher.publishAll(list, { window: 2000 });
  let published = 0;
  void publishing.then(() => (published = performance.now()));
  let peakSampled = 0;
  for (;;) {
    const rows = await countRows(sql);
    for (const c of children) peakSampled = Math.max(peakSampled, rssPeakMb(c.pid) ?? 0);
    if (rows >= N) break;
    if (performance.now() - started > 600_000) throw new Error(`only ${rows} of ${N} rows after 10 minutes`);
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
  const seconds = (performance.now() - started) / 1000;
  await publishing;
  const peaks = children.map((c) => rssPeakMb(c.pid) ?? 0);
  for (const c of children) {
    const code = await c.stop('SIGTERM');
    if (code !== 0) say(`  ingester exited with ${code}: ${c.output().slice(-2000)}`);
    if (logDir) writeFileSync(`${logDir}/ingester-${run}-${children.indexOf(c)}.log`, c.output());
    const stopped = /"msg":"ingester stopped".*"memory":(\{[^}]*\})/.exec(c.output());
    if (stopped) say(`  ingester memory (sampled each second, MB): ${stopped[1]}`);
  }
  await publisher.close();
  return { rate: N / seconds, seconds, publishSeconds: (published - started) / 1000, rssPeakMb: Math.max(...peaks, peakSampled) };
}

async function main() {
  const created = await createPostgresDatabase(adminUrl, 'millrace_bench');
  let mosquitto: TestMosquitto | undefined;
  let handle: DatabaseHandle | undefined;
  const sql = postgres(created.url, { max: 2, onnotice: () => {} });
  try {
    handle = await openDatabase({ url: created.url, maxConnections: 2 });
    await registerFleet(handle, fleet);
    await ensureMonthlyPartitions({ db: handle.db, fromMs: start, toMs: Date.now() + 86_400_000 });
    const brokerUrl = process.env.MQTT_URL || (mosquitto = await startMosquitto({ auth: 'open-for-tests' })).url;
    const keys = new Map((await sql`select key, id from units`).map((r) => [String(r.id), Number(r.key)]));
    const list = messages();
    const payloadBytes = list.reduce((s, m) => s + Buffer.byteLength(m.payload as string), 0);
    say(`ingest benchmark: ${fmt(N)} samples, ${fmt(list.length)} messages of ${SAMPLES_PER_MESSAGE} (${Math.round(payloadBytes / list.length)} bytes each), ${unitCount} units`);
    say(`  database ${new URL(created.url).host}${new URL(created.url).pathname} (fresh), broker ${mosquitto ? `${brokerUrl} (own Mosquitto, shipped configuration)` : brokerUrl}`);
    say(`  ingester: node ${ingestCommand(nodeArgs).join(' ')}`);
    say(`  ${process.env.INGEST_CONNECTIONS ?? 4} connections, batches of ${process.env.INGEST_BATCH_SAMPLES ?? 40_000} samples or ${process.env.INGEST_BATCH_MS ?? 200} ms, buffer ${process.env.INGEST_BUFFER_SAMPLES ?? 200_000} samples`);

    const ceiling = await copyCeiling(sql, keys, list);
    say(`COPY ceiling (no broker, no ingester): ${fmt(ceiling)} rows/s`);
    const [size] = await sql`
      select sum(pg_total_relation_size(c.oid))::float8 as bytes from pg_inherits i join pg_class c on c.oid = i.inhrelid
      join pg_class p on p.oid = i.inhparent where p.relname = 'telemetry_samples'`;
    const bytesPerRow = Number(size!.bytes) / N;
    say(`  stored size: ${fmt(bytesPerRow)} bytes per row (table, primary key and BRIN index, pg_total_relation_size)`);
    await reset(sql);

    const one = await endToEnd(sql, created.url, brokerUrl, 1, list, 1);
    say(`end to end, 1 ingester: ${fmt(one.rate)} samples/s (${one.seconds.toFixed(1)} s; publisher done after ${one.publishSeconds.toFixed(1)} s), ingester RSS peak ${one.rssPeakMb.toFixed(0)} MB`);
    const [rollups] = await sql`select sum(samples)::int as n from telemetry_rollups_10m`;
    if (Number(rollups!.n) !== N) say(`  WARNING: rollups count ${rollups!.n} samples, expected ${N}`);
    await reset(sql);

    const two = await endToEnd(sql, created.url, brokerUrl, 2, list, 2);
    say(`end to end, 2 ingesters: ${fmt(two.rate)} samples/s (${two.seconds.toFixed(1)} s), ingester RSS peak ${two.rssPeakMb.toFixed(0)} MB, ratio to COPY ${(two.rate / ceiling).toFixed(2)}`);
    // Plain digits here: this line is for scripts.
    say(`ingest: ${Math.round(one.rate)} samples/s end-to-end, ${Math.round(ceiling)} samples/s COPY ceiling, ratio ${(one.rate / ceiling).toFixed(2)}`);
  } finally {
    await sql.end({ timeout: 5 });
    await handle?.close();
    await created.drop();
    await mosquitto?.dispose();
  }
}

main().then(
  () => process.exit(0),
  (error) => {
    process.stderr.write(`bench:ingest: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
    process.exit(1);
  },
);
