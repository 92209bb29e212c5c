/**
 * `millrace export` writes the CSV log that `check` and `energy` read
 * (contract, section 4): the round trip through readCsvLog gives back the
 * stored samples, in time order, absent values absent.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDatabase } from '@/db/client';
import type { TelemetrySample } from '@/lib/contract/telemetry';
import { insertSampleRows } from '@/lib/ingest/queries';
import { inTransaction } from '@/lib/ingest/sql';
import { createPostgresDatabase, realDatabaseUrl } from '@/test/support/backend';
import { registerFleet, testFleet, testTag } from '@/test/support/ingest';
import { readCsvLog } from './csv-log';
import { EXPORT_PAGE_ROWS } from './export';
import { main } from './main';

// The command opens the database the configuration names: point it at a
// fresh one before anything reads the configuration.
const dir = mkdtempSync(join(tmpdir(), 'millrace-export-'));
const created = realDatabaseUrl ? await createPostgresDatabase(realDatabaseUrl, 'millrace_export') : undefined;
if (created) process.env.DATABASE_URL = created.url;
else {
  delete process.env.DATABASE_URL;
  process.env.DATA_DIR = join(dir, 'data');
}

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 2, hydroUnits: 0 });
const unit = fleet.units[0]!;
const other = fleet.units[1]!;
const base = Math.floor((Date.now() - 20 * 86_400_000) / 1000) * 1000;
const count = EXPORT_PAGE_ROWS * 2 + 321;

/** Samples with some fields absent now and then, negative kW, odd decimals. */
function sampleAt(i: number): TelemetrySample {
  const s: TelemetrySample = { ts: base + i * 10_000 + (i % 7), rpm: 150 + (i % 90) + 0.1, vab: 230.3 + (i % 11) / 10 };
  if (i % 3) s.vbc = 229.7 + (i % 5) / 10;
  if (i % 4) s.hz = 35 + (i % 13) / 7;
  if (i % 5) s.kw = (i % 40) / 3 - 1;
  if (i % 2) s.windMs = 3 + (i % 20) / 3;
  if (i % 9 === 0) s.statorC = 41.25;
  return s;
}

async function runCli(args: string[]) {
  let out = '';
  let err = '';
  const stdout = new Writable({ write: (chunk, _enc, cb) => ((out += chunk.toString()), cb()) });
  const stderr = new Writable({ write: (chunk, _enc, cb) => ((err += chunk.toString()), cb()) });
  const code = await main(['export', ...args], { stdout, stderr });
  return { code, out, err };
}

describe(`millrace export (${created ? 'PostgreSQL' : 'embedded PGlite'})`, () => {
  beforeAll(async () => {
    const handle = await openDatabase(created ? { url: created.url } : { dataDir: process.env.DATA_DIR! });
    try {
      await registerFleet(handle, fleet);
      const [{ key }] = (await inTransaction(handle, (tx) => tx.query<{ key: number }>('select key from units where id = $1', [unit.id]))) as [{ key: number }];
      const [{ key: otherKey }] = (await inTransaction(handle, (tx) => tx.query<{ key: number }>('select key from units where id = $1', [other.id]))) as [{ key: number }];
      // Written in shuffled order; another unit's samples interleaved.
      const order = Array.from({ length: count }, (_, i) => i).sort((a, b) => ((a * 7919) % count) - ((b * 7919) % count));
      await inTransaction(handle, async (tx) => {
        await insertSampleRows({ tx, rows: order.map((i) => ({ unitKey: Number(key), sample: sampleAt(i) })) });
        await insertSampleRows({ tx, rows: [0, 1, 2].map((i) => ({ unitKey: Number(otherKey), sample: sampleAt(i) })) });
      });
    } finally {
      await handle.close();
    }
  });

  afterAll(async () => {
    await created?.drop();
    rmSync(dir, { recursive: true, force: true });
  });

  it('writes every stored sample in time order, and readCsvLog reads them back as stored', async () => {
    const { code, out, err } = await runCli(['--unit', `${unit.siteId}/${unit.id}`]);
    expect(code, err).toBe(0);
    expect(out.split('\n')[0]).toBe('ts,rpm,hz,vab,vbc,vca,ia,ib,ic,kw,statorC,ambientC,windMs,airKgM3,flowM3s,headM');
    expect(out.split('\n')[1]).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z,/);
    expect(err).toMatch(new RegExp(`${count} samples of ${unit.siteId}/${unit.id}`));
    const file = join(dir, 'export.csv');
    writeFileSync(file, out);
    const read: TelemetrySample[] = [];
    const bad: string[] = [];
    const summary = await readCsvLog(file, { onSample: (s) => read.push(s), onBadRow: (line, problems) => bad.push(`${line}: ${problems.join('; ')}`) });
    expect(bad).toEqual([]);
    expect(summary.goodRows).toBe(count);
    // Stored values are float4: compare at that precision.
    const f = (v: number | undefined) => (v === undefined ? undefined : Math.fround(v));
    read.forEach((s, i) => {
      const want = sampleAt(i);
      expect(s.ts).toBe(want.ts);
      for (const key of ['rpm', 'hz', 'vab', 'vbc', 'vca', 'ia', 'kw', 'statorC', 'windMs', 'flowM3s'] as const) {
        expect(f(s[key]), `${key} of row ${i}`).toBe(f(want[key]));
      }
    });
  });

  it('keeps to --from (inclusive) and --to (exclusive)', async () => {
    const from = new Date(sampleAt(100).ts).toISOString();
    const to = String(sampleAt(200).ts);
    const { code, out } = await runCli(['--unit', `${unit.siteId}/${unit.id}`, '--from', from, '--to', to]);
    expect(code).toBe(0);
    const lines = out.trim().split('\n').slice(1);
    expect(lines).toHaveLength(100);
    expect(lines[0]!.split(',')[0]).toBe(from);
    const date = await runCli(['--unit', `${unit.siteId}/${unit.id}`, '--to', new Date(base).toISOString().slice(0, 10)]);
    expect(date.out.trim().split('\n')).toHaveLength(1); // header only: everything is after that midnight
  });

  it('refuses an unknown unit, a unit under another site, and a bad time, with exit status 2', async () => {
    const unknown = await runCli(['--unit', `${unit.siteId}/nobody-${tag}`]);
    expect(unknown.code).toBe(2);
    expect(unknown.err).toMatch(new RegExp(`unit "nobody-${tag}" is not registered`));
    const wrongSite = await runCli(['--unit', `elsewhere/${unit.id}`]);
    expect(wrongSite.code).toBe(2);
    expect(wrongSite.err).toMatch(new RegExp(`is registered under site "${unit.siteId}", not "elsewhere"`));
    const badFrom = await runCli(['--unit', `${unit.siteId}/${unit.id}`, '--from', 'last tuesday']);
    expect(badFrom.code).toBe(2);
    expect(badFrom.err).toMatch(/--from: expected an ISO-8601 time with offset .* got "last tuesday"/);
    const badDate = await runCli(['--unit', `${unit.siteId}/${unit.id}`, '--to', '2026-02-30']);
    expect(badDate.code).toBe(2);
    const reversed = await runCli(['--unit', `${unit.siteId}/${unit.id}`, '--from', '2026-03-02', '--to', '2026-03-01']);
    expect(reversed.code).toBe(2);
    expect(reversed.err).toMatch(/--to .* must be later than --from/);
    const missing = await runCli([]);
    expect(missing.code).toBe(2);
    expect(missing.err).toMatch(/--unit is required/);
    expect((await runCli(['--unit', 'no-slash'])).code).toBe(2);
  });

  it('gives a log that `millrace energy` reads as it reads the samples written straight to a log', async () => {
    const plate = join(dir, 'unit.json');
    writeFileSync(plate, JSON.stringify(unit));
    const energyOf = async (log: string) => {
      let text = '';
      const stdout = new Writable({ write: (chunk, _enc, cb) => ((text += chunk.toString()), cb()) });
      const stderr = new Writable({ write: (_c, _e, cb) => cb() });
      expect(await main(['energy', '--nameplate', plate, '--log', log, '--json'], { stdout, stderr })).toBe(0);
      return JSON.parse(text) as { samplesUsed: number; months: Array<Record<string, unknown>> };
    };
    const { out } = await runCli(['--unit', `${unit.siteId}/${unit.id}`]);
    const exported = join(dir, 'energy.csv');
    writeFileSync(exported, out);
    // The same samples written by hand, at the float4 precision they are stored with.
    const fields = ['rpm', 'hz', 'vab', 'vbc', 'kw', 'statorC', 'windMs'] as const;
    const cell = (v: number | undefined) => (v === undefined ? '' : String(Math.fround(v)));
    const direct = join(dir, 'direct.csv');
    const rows = Array.from({ length: count }, (_, i) => sampleAt(i)).map((s) => [new Date(s.ts).toISOString(), ...fields.map((k) => cell(s[k]))].join(','));
    writeFileSync(direct, `${['ts', ...fields].join(',')}\n${rows.join('\n')}\n`);
    const got = await energyOf(exported);
    const want = await energyOf(direct);
    expect(want.months.length).toBeGreaterThan(0);
    expect(got.samplesUsed).toBe(want.samplesUsed);
    expect(got.months.map((m) => m.month)).toEqual(want.months.map((m) => m.month));
    got.months.forEach((m, k) => {
      for (const [key, value] of Object.entries(want.months[k]!)) {
        if (typeof value === 'number') expect(m[key], `${String(m.month)} ${key}`).toBeCloseTo(value, 6);
        else expect(m[key], `${String(m.month)} ${key}`).toEqual(value);
      }
    });
  });
});

