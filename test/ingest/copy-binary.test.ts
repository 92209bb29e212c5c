/**
 * The ingester writes samples to PostgreSQL in COPY's binary format, which it
 * encodes itself. Checked against PostgreSQL's own reading of the same rows
 * sent another way (an unnest insert of float8 values cast to real, the path
 * PGlite uses), and against the definitions it relies on: real is IEEE 754
 * binary32 (PostgreSQL manual, "Floating-Point Types"; ECMAScript Math.fround
 * rounds to it), timestamptz counts microseconds from 2000-01-01 UTC
 * (PostgreSQL manual, COPY, "Binary Format" and "Date/Time Types").
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDatabase, type DatabaseHandle } from '@/db/client';
import { ensureMonthlyPartitions } from '@/db/partitions';
import { VALUE_FIELDS } from '@/lib/contract/telemetry';
import { writeNewSamples, type SampleRowRefs } from '@/lib/ingest/queries';
import { sampleBlockOf, type SampleBlock } from '@/lib/ingest/sample-block';
import { openIngestDatabase, type IngestDatabase } from '@/lib/ingest/sql';
import type { TelemetrySample } from '@/lib/contract/telemetry';
import { createPostgresDatabase } from '@/test/support/backend';
import { adminDatabaseUrl, queryRows, registerFleet, testFleet, testTag } from '@/test/support/ingest';
import { postgresServer, skipUnless } from '@/test/support/services';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 2, hydroUnits: 0 });

/** Edge cases of the encoding: PostgreSQL's epoch itself, far ahead, sub-second, negative power, tiny and large values, absent fields. */
const samples: TelemetrySample[] = [
  { ts: Date.UTC(2000, 0, 1), rpm: 0, vab: 0 },
  { ts: Date.UTC(2000, 0, 1, 0, 0, 0, 1), rpm: 0.1, vab: 230.25, kw: -0.5 },
  { ts: Date.UTC(2026, 11, 2, 3, 4, 5, 678), rpm: 312.7, hz: 41.69, vab: 228.4, vbc: 229.1, vca: 227.9, ia: 12.3, ib: 12.1, ic: 12.6, kw: 4.81, statorC: 61.5, ambientC: -12.25, windMs: 8.3 },
  { ts: Date.UTC(2026, 11, 2, 3, 4, 5, 679), rpm: 99_999.99, vab: 9_999.9, airKgM3: 1.225, flowM3s: 1e-7, headM: 2_999.5 },
  { ts: Date.UTC(2099, 11, 31, 23, 59, 59, 999), rpm: 1500, vab: 400, kw: -99_999.9 },
];

function refsOf(block: SampleBlock, unitKey: number): SampleRowRefs {
  return {
    count: block.count,
    unitKeys: new Int32Array(block.count).fill(unitKey),
    blocks: new Array<SampleBlock>(block.count).fill(block),
    index: Int32Array.from({ length: block.count }, (_, i) => i),
  };
}

const COLUMNS = VALUE_FIELDS.map((f) => f.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`));

async function stored(handle: DatabaseHandle, unitKey: number) {
  return queryRows<Record<string, number | string | null>>(
    handle,
    `select (extract(epoch from ts) * 1000)::float8 as t, ${COLUMNS.map((c) => `${c}::float8 as ${c}`).join(', ')}
     from telemetry_samples where unit_key = $1 order by ts`,
    [unitKey],
  );
}

// Needs a real PostgreSQL: binary COPY is the path the ingester takes on a server (on PGlite it inserts with unnest).
describe.skipIf(skipUnless(postgresServer, 'binary COPY'))('binary COPY of samples (PostgreSQL)', () => {
  let handle: DatabaseHandle;
  let ingest: IngestDatabase;
  let drop: () => Promise<void>;
  let keys: number[];

  beforeAll(async () => {
    const created = await createPostgresDatabase(adminDatabaseUrl(), 'millrace_copy');
    drop = created.drop;
    handle = await openDatabase({ url: created.url, maxConnections: 2 });
    await registerFleet(handle, fleet);
    await ensureMonthlyPartitions({ db: handle.db, fromMs: samples[0]!.ts, toMs: samples.at(-1)!.ts });
    keys = (await queryRows<{ key: number }>(handle, 'select key from units order by id')).map((r) => Number(r.key));
    ingest = await openIngestDatabase(handle);
  });

  afterAll(async () => {
    await ingest?.close();
    await handle?.close();
    await drop?.();
  });

  it('stores what an unnest insert of the same rows stores, field for field', async () => {
    const block = sampleBlockOf(samples);
    await ingest.transaction((tx) => writeNewSamples({ tx, rows: refsOf(block, keys[0]!) }));
    // The same rows by the other path: a runner without copyIn takes the unnest insert.
    await ingest.transaction((tx) => writeNewSamples({ tx: { query: tx.query, command: tx.command }, rows: refsOf(block, keys[1]!) }));
    const [byCopy, byInsert] = [await stored(handle, keys[0]!), await stored(handle, keys[1]!)];
    expect(byCopy).toHaveLength(samples.length);
    expect(byCopy).toEqual(byInsert);
  });

  it('keeps each time to the millisecond and each value as its float4, absent fields NULL', async () => {
    const rows = await stored(handle, keys[0]!);
    rows.forEach((row, i) => {
      const sample = samples[i]!;
      expect(Number(row.t)).toBe(sample.ts);
      VALUE_FIELDS.forEach((field, f) => {
        const value = sample[field];
        const got = row[COLUMNS[f]!];
        if (value === undefined) expect(got, field).toBeNull();
        else expect(Number(got), field).toBe(Math.fround(value));
      });
    });
  });

  it('a refused COPY fails its transaction with an error (not a wait), and the INSERT retry says why', async () => {
    // postgres-js drops the server's refusal of COPY data; lib/ingest/sql.ts notices it with a probe.
    const again = sampleBlockOf([{ ts: samples[2]!.ts + 2, rpm: 1, vab: 1 }, samples[2]!]);
    await expect(ingest.transaction((tx) => writeNewSamples({ tx, rows: refsOf(again, keys[0]!) }))).rejects.toMatchObject({
      code: 'COPY_REFUSED',
    });
    ingest.reset();
    await expect(ingest.transaction((tx) => writeNewSamples({ tx, rows: refsOf(again, keys[0]!), byInsert: true }))).rejects.toThrow(
      /1 of 2 rows were stored meanwhile/,
    );
    ingest.reset();
    expect(await stored(handle, keys[0]!)).toHaveLength(samples.length);
  });
});
