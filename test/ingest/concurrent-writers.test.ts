/**
 * Two ingest transactions writing neighbouring samples of one unit at the
 * same moment (two ingesters of a share group) must leave the energy rollup
 * equal to the trapezoid over the stored series (lib/energy, contract
 * section 5). Without serialisation each would read its neighbours before the
 * other commits and count an interval across the other's samples.
 *
 * Made deterministic with a third connection that holds the unit's rollup
 * row: transaction A stops there after reading its neighbours; then B runs
 * until it waits too; then the row is released.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import postgres from 'postgres';
import { openDatabase, type DatabaseHandle } from '@/db/client';
import { integrateIntoBuckets } from '@/lib/energy/integrate';
import { openIngestDatabase, type IngestDatabase } from '@/lib/ingest/sql';
import { createUnitDirectory } from '@/lib/ingest/unit-directory';
import { writeBatch, type DecodedMessage } from '@/lib/ingest/writer';
import { createPostgresDatabase } from '@/test/support/backend';
import { adminDatabaseUrl, decodedMessage, queryRows, registerFleet, testFleet, testTag, waitFor } from '@/test/support/ingest';
import { postgresServer, skipUnless } from '@/test/support/services';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 1, hydroUnits: 0 });
const unit = fleet.units[0]!;
const bucket = Math.floor((Date.now() - 3_600_000) / 600_000) * 600_000;

function message(samples: Array<{ ts: number; kw: number }>): DecodedMessage {
  return decodedMessage(unit, samples.map((s) => ({ ts: s.ts, rpm: 250, vab: 230, kw: s.kw })));
}

// Needs a real PostgreSQL: three connections and row locks (PGlite has one connection).
describe.skipIf(skipUnless(postgresServer, 'concurrent transactions'))('two ingest transactions on neighbouring samples of one unit', { timeout: 60_000 }, () => {
  let db: { url: string; drop(): Promise<void> };
  let handle: DatabaseHandle;
  let writers: IngestDatabase[];
  let blocker: postgres.Sql;
  let probe: postgres.Sql;

  beforeAll(async () => {
    db = await createPostgresDatabase(adminDatabaseUrl(), 'millrace_ingest_concurrent');
    handle = await openDatabase({ url: db.url, maxConnections: 2 });
    process.stdout.write(`concurrent-writers: PostgreSQL ${new URL(db.url).host}${new URL(db.url).pathname}\n`);
    await registerFleet(handle, fleet);
    writers = [await openIngestDatabase(handle), await openIngestDatabase(handle)];
    blocker = postgres(db.url, { max: 1, onnotice: () => {} });
    probe = postgres(db.url, { max: 1, onnotice: () => {} });
  });

  afterAll(async () => {
    await blocker?.end();
    await probe?.end();
    for (const w of writers ?? []) await w.close();
    await handle?.close();
    await db?.drop();
  });

  it('serialises them so that the second sees the first', async () => {
    const directory = () => createUnitDirectory({ db: writers[0]!.runner });
    // A stored sample opens the bucket's rollup row.
    await writeBatch({ database: writers[0]!, directory: directory(), messages: [message([{ ts: bucket + 1000, kw: 1 }])] });
    // A writes 10 s and 30 s, B writes 20 s: interleaved.
    const a = message([{ ts: bucket + 10_000, kw: 4 }, { ts: bucket + 30_000, kw: 8 }]);
    const b = message([{ ts: bucket + 20_000, kw: 20 }]);

    const waiting = async () =>
      Number(
        (
          await probe.unsafe(
            `select count(*)::int as n from pg_stat_activity where datname = current_database() and wait_event_type = 'Lock' and pid <> pg_backend_pid()`,
          )
        )[0]!.n,
      );
    let release!: () => void;
    const held = new Promise<void>((resolve) => (release = resolve));
    const holding = blocker.begin(async (tx) => {
      await tx.unsafe('select 1 from telemetry_rollups_10m for update');
      await held;
    });
    await waitFor('the rollup row to be held', async () => Number((await probe.unsafe(`select count(*)::int as n from pg_locks where locktype = 'transactionid' and granted`))[0]!.n) > 0, { timeoutMs: 20_000 });
    const first = writeBatch({ database: writers[0]!, directory: directory(), messages: [a] });
    await waitFor('A to wait at the rollup row', async () => (await waiting()) >= 1, { timeoutMs: 20_000 });
    const second = writeBatch({ database: writers[1]!, directory: directory(), messages: [b] });
    await waitFor('B to wait (for A, or at the rollup row)', async () => (await waiting()) >= 2, { timeoutMs: 20_000 });
    release();
    await holding;
    await Promise.all([first, second]);

    const series = await queryRows<{ t: number; kw: number }>(
      handle,
      'select (extract(epoch from ts) * 1000)::float8 as t, kw::float8 as kw from telemetry_samples order by ts',
    );
    expect(series.map((r) => Number(r.t) - bucket)).toEqual([1000, 10_000, 20_000, 30_000]);
    const reference = integrateIntoBuckets({ tsMs: series.map((r) => Number(r.t)), values: series.map((r) => Number(r.kw)) }, [bucket, bucket + 600_000]);
    const [rollup] = await queryRows<{ kwh: number; covered_s: number; samples: number }>(handle, 'select kwh, covered_s, samples from telemetry_rollups_10m');
    // Trapezoids (hand check): (1+4)/2·9 s + (4+20)/2·10 s + (20+8)/2·10 s = 22.5 + 120 + 140 = 282.5 kW·s.
    expect(reference.valueHours[0]! * 3600).toBeCloseTo(282.5, 9);
    expect(Number(rollup!.kwh)).toBeCloseTo(reference.valueHours[0]!, 12);
    expect(Number(rollup!.covered_s)).toBeCloseTo(29, 9);
    expect(Number(rollup!.samples)).toBe(4);
  });
});
