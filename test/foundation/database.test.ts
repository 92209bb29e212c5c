import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDatabase, rowsOf } from '@/db/client';
import { dropPartitionsBefore, ensureMonthlyPartitions, listPartitions, partitionName } from '@/db/partitions';
import { deleteQuarantineBefore } from '@/lib/ingest/maintenance';
import { createTestDatabase, realDatabaseUrl, type TestDatabase } from '@/test/support/backend';

let testDb: TestDatabase;
beforeAll(async () => {
  testDb = await createTestDatabase();
});
afterAll(async () => {
  await testDb?.drop();
});

describe(`database schema on ${realDatabaseUrl ? 'PostgreSQL' : 'PGlite'}`, () => {
  it('creates every table of the first schema', async () => {
    const rows = rowsOf<{ name: string }>(
      await testDb.handle.db.execute(sql`select tablename as name from pg_tables where schemaname = 'public' order by 1`),
    );
    const names = rows.map((r) => r.name);
    for (const table of [
      'sites',
      'units',
      'telemetry_samples',
      'quarantine',
      'telemetry_rollups_10m',
      'telemetry_rollups_daily',
      'unit_status',
      'unit_health',
      'unit_health_history',
      'unit_alerts',
      'unit_alert_events',
      'alert_condition_states',
      'webhook_endpoints',
      'webhook_deliveries',
      'webhook_attempts',
    ]) {
      expect(names).toContain(table);
    }
    // The first schema's alert tables (states open/acknowledged/resolved) were carried over and dropped.
    expect(names).not.toContain('alerts');
    expect(names).not.toContain('alert_events');
  });

  it('range-partitions telemetry by ts, with partitions made ahead and a BRIN index', async () => {
    const db = testDb.handle.db;
    const strategy = rowsOf<{ strategy: string }>(
      await db.execute(sql`select partstrat as strategy from pg_partitioned_table where partrelid = 'telemetry_samples'::regclass`),
    );
    expect(strategy[0]?.strategy).toBe('r');
    const partitions = await listPartitions({ db });
    expect(partitions).toContain(partitionName(Date.now()));
    const ahead = new Date();
    ahead.setUTCMonth(ahead.getUTCMonth() + 2, 1);
    expect(partitions).toContain(partitionName(ahead.getTime()));
    const brin = rowsOf<{ method: string }>(
      await db.execute(sql`select am.amname as method from pg_class c join pg_am am on am.oid = c.relam where c.relname = 'telemetry_samples_ts_brin'`),
    );
    expect(brin[0]?.method).toBe('brin');
  });

  it('stores a sample in a partition made on demand and drops whole old partitions', async () => {
    const db = testDb.handle.db;
    const old = Date.UTC(2021, 4, 17, 12);
    await ensureMonthlyPartitions({ db, fromMs: old, toMs: old });
    await db.execute(sql`insert into telemetry_samples (unit_key, ts, rpm, vab) values (1, ${new Date(old).toISOString()}::timestamptz, 250, 230)`);
    const where = rowsOf<{ part: string }>(
      await db.execute(sql`select tableoid::regclass::text as part from telemetry_samples where unit_key = 1`),
    );
    expect(where[0]?.part.replace(/"/g, '')).toBe('telemetry_samples_y2021m05');
    const dropped = await dropPartitionsBefore({ db, cutoffMs: Date.UTC(2022, 0, 1) });
    expect(dropped).toEqual(['telemetry_samples_y2021m05']);
    const left = rowsOf<{ n: number }>(await db.execute(sql`select count(*)::int as n from telemetry_samples`));
    expect(left[0]?.n).toBe(0);
  });

  it('deletes telemetry set aside before the retention cutoff, by when it arrived, and keeps the rest', async () => {
    const db = testDb.handle.db;
    for (const [at, topic] of [
      ['2021-03-01T00:00:00Z', 'millrace/old/one/telemetry'],
      ['2021-12-31T23:59:59Z', 'millrace/old/two/telemetry'],
      ['2022-01-01T00:00:00Z', 'millrace/kept/three/telemetry'],
    ] as const) {
      await db.execute(
        sql`insert into quarantine (received_at, topic, payload, payload_bytes, reason) values (${at}::timestamptz, ${topic}, '{}', 2, 'test row')`,
      );
    }
    expect(await deleteQuarantineBefore({ db, cutoffMs: Date.UTC(2022, 0, 1) })).toBe(2);
    const left = rowsOf<{ topic: string }>(await db.execute(sql`select topic from quarantine where reason = 'test row'`));
    expect(left.map((r) => r.topic)).toEqual(['millrace/kept/three/telemetry']);
  });

  it('applies migrations idempotently', async () => {
    const { migrateDatabase } = await import('@/db/client');
    await expect(migrateDatabase(testDb.handle)).resolves.toBeUndefined();
  });
});

describe('embedded database folder', () => {
  const dir = mkdtempSync(join(tmpdir(), 'millrace-lock-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('persists across opens, and a second process is refused while one holds it', async () => {
    const first = await openDatabase({ dataDir: dir });
    await first.db.execute(sql`insert into sites (id, name, timezone) values ('malvessik-orn', 'Malvessik Orn', 'Europe/Oslo')`);
    const script = `
      import { openDatabase } from ${JSON.stringify(join(process.cwd(), 'db/client.ts'))};
      try { await openDatabase({ dataDir: ${JSON.stringify(dir)} }); console.log('opened'); }
      catch (e) { console.log('refused: ' + e.message); }`;
    const child = spawnSync(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', script], { encoding: 'utf8' });
    expect(child.stdout).toMatch(/^refused: the embedded database in .* is in use by process \d+/);
    expect(child.stdout).toContain('set DATABASE_URL');
    await first.close();

    const again = await openDatabase({ dataDir: dir });
    const rows = rowsOf<{ name: string }>(await again.db.execute(sql`select name from sites`));
    expect(rows.map((r) => r.name)).toEqual(['Malvessik Orn']);
    await again.close();
  });
});
