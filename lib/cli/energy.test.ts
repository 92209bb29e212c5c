import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { main, type CliIo } from './main';

const dir = mkdtempSync(join(tmpdir(), 'millrace-energy-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const MIN = 60_000;

const windPlate = {
  id: 'knoll-2',
  siteId: 'vennoral-drusk',
  name: 'Knoll 2',
  kind: 'wind',
  ratedKw: 10,
  ratedRpm: 300,
  maxRpm: 450,
  poles: 12,
  keVPerKrpm: 1200,
  magnet: 'ndfeb',
  phaseOhm: 0.4,
  powerCurve: [
    { ms: 3, kw: 0.2 },
    { ms: 5, kw: 1.5 },
    { ms: 8, kw: 5.5 },
    { ms: 11, kw: 10 },
  ],
  cutInMs: 3,
  cutOutMs: 25,
  rotorDiameterM: 7,
};

const hydroPlate = {
  id: 'weir-1',
  siteId: 'yantrevo-pellik',
  kind: 'hydro',
  ratedKw: 40,
  ratedRpm: 750,
  maxRpm: 1500,
  poles: 8,
  keVPerKrpm: 500,
  magnet: 'ferrite',
  phaseOhm: 0.1,
  designHeadM: 12,
  designFlowM3s: 0.4,
  efficiency: 0.75,
};

let fileNo = 0;
function file(name: string, content: string): string {
  const path = join(dir, `${fileNo++}-${name}`);
  writeFileSync(path, content);
  return path;
}

type Row = Record<string, string | number | undefined>;

function csv(header: readonly string[], rows: readonly Row[]): string {
  const lines = [header.join(',')];
  for (const row of rows) lines.push(header.map((h) => (row[h] === undefined ? '' : String(row[h]))).join(','));
  return `${lines.join('\n')}\n`;
}

/** Rows every `stepMin` minutes from `fromMs` up to and including `toMs`. */
function rowsBetween(fromMs: number, toMs: number, stepMin: number, make: (ts: number, i: number) => Row): Row[] {
  const rows: Row[] = [];
  let i = 0;
  for (let t = fromMs; t <= toMs; t += stepMin * MIN) rows.push(make(t, i++));
  return rows;
}

function capture(): { io: CliIo; out: () => string; err: () => string } {
  let out = '';
  let err = '';
  const sink = (append: (s: string) => void) =>
    new Writable({
      write(chunk, _encoding, done) {
        append(String(chunk));
        done();
      },
    });
  return { io: { stdout: sink((s) => (out += s)), stderr: sink((s) => (err += s)) }, out: () => out, err: () => err };
}

async function energy(args: string[]) {
  const c = capture();
  const status = await main(['energy', ...args], c.io);
  return { status, out: c.out(), err: c.err() };
}

async function energyJson(args: string[]) {
  const r = await energy([...args, '--json']);
  expect(r.err).toBe('');
  expect(r.status).toBe(0);
  return JSON.parse(r.out) as {
    months: Array<Record<string, number | string | null>>;
    timeZone: string;
    samplesUsed: number;
    rowsSkipped: { count: number; first: Array<{ line: number; problems: string[] }> };
    notes: Array<{ code: string; severity: string; message: string }>;
  };
}

const windPlatePath = file('wind.json', JSON.stringify(windPlate));
const hydroPlatePath = file('hydro.json', JSON.stringify(hydroPlate));
const WIND_HEADER = ['ts', 'rpm', 'vab', 'kw', 'windMs'];

describe('millrace energy --json', () => {
  // Constant 6 kW at a steady 8 m/s (5.5 kW on the curve) through April 2026, every 10 minutes.
  const april = rowsBetween(Date.UTC(2026, 3, 1), Date.UTC(2026, 4, 1), 10, (ts) => ({
    ts: new Date(ts).toISOString(),
    rpm: 240,
    vab: 290,
    kw: 6,
    windMs: 8,
  }));
  const aprilPath = file('april.csv', csv(WIND_HEADER, april));

  it('gives the contract fields per month', async () => {
    const r = await energyJson(['--nameplate', windPlatePath, '--log', aprilPath]);
    expect(r.timeZone).toBe('UTC');
    expect(r.samplesUsed).toBe(april.length);
    expect(r.months.map((m) => Object.keys(m))).toEqual([
      ['month', 'kwh', 'coveragePct', 'capacityFactorPct', 'availabilityPct', 'expectedKwh', 'performanceRatio'],
      ['month', 'kwh', 'coveragePct', 'capacityFactorPct', 'availabilityPct', 'expectedKwh', 'performanceRatio'],
    ]);
    expect(r.months[0]).toEqual({
      month: '2026-04',
      kwh: 4320, // 6 kW × 720 h
      coveragePct: 100,
      capacityFactorPct: 60, // 4320 / (10 kW × 720 h)
      availabilityPct: 100,
      expectedKwh: 3960, // 5.5 kW × 720 h
      performanceRatio: 1.0909, // 6 / 5.5
    });
    // The last sample falls on 1 May: May is listed, with nothing measured.
    expect(r.months[1]).toEqual({
      month: '2026-05',
      kwh: null,
      coveragePct: 0,
      capacityFactorPct: null,
      availabilityPct: null,
      expectedKwh: null,
      performanceRatio: null,
    });
    expect(r.rowsSkipped).toEqual({ count: 0, first: [] });
    expect(r.notes.map((n) => n.code)).toEqual(['no-air-density']);
  });

  it('gives the same figures for a shuffled log, and says it sorted', async () => {
    const shuffled = [...april];
    // Deterministic shuffle (a linear congruential generator).
    let seed = 12345;
    for (let i = shuffled.length - 1; i > 0; i--) {
      seed = (seed * 1103515245 + 12345) % 2 ** 31;
      const j = seed % (i + 1);
      [shuffled[i], shuffled[j]] = [shuffled[j] as Row, shuffled[i] as Row];
    }
    const path = file('shuffled.csv', csv(['windMs', 'kw', 'ts', 'vab', 'rpm'], shuffled));
    const sorted = await energyJson(['--nameplate', windPlatePath, '--log', aprilPath]);
    const r = await energyJson(['--nameplate', windPlatePath, '--log', path]);
    expect(r.months).toEqual(sorted.months);
    expect(r.notes.map((n) => n.code)).toContain('out-of-order');
  });

  it('skips bad rows, counts them and names their lines and reasons', async () => {
    const rows: Row[] = rowsBetween(Date.UTC(2026, 3, 1), Date.UTC(2026, 3, 1, 1), 5, (ts) => ({
      ts: new Date(ts).toISOString(),
      rpm: 240,
      vab: 290,
      kw: 6,
      windMs: 8,
    }));
    rows[2] = { ...rows[2], kw: 'lots' };
    rows[4] = { ...rows[4], rpm: -3 };
    rows[6] = { ...rows[6], ts: 'yesterday' };
    const r = await energyJson(['--nameplate', windPlatePath, '--log', file('bad.csv', csv(WIND_HEADER, rows))]);
    expect(r.rowsSkipped.count).toBe(3);
    // Header is line 1, so rows[2] is line 4.
    expect(r.rowsSkipped.first.map((b) => b.line)).toEqual([4, 6, 8]);
    expect(r.rowsSkipped.first[0]?.problems.join(' ')).toMatch(/^kw: /);
    expect(r.rowsSkipped.first[1]?.problems.join(' ')).toMatch(/^rpm: /);
    const note = r.notes.find((n) => n.code === 'rows-skipped');
    expect(note?.severity).toBe('warning');
    expect(note?.message).toMatch(/^3 of 13 rows skipped as invalid, not counted: line 4 \(kw: .*\), line 6 \(rpm: .*\), line 8 \(ts: .*\)$/);
    expect(r.samplesUsed).toBe(10);
    // The good samples are 5 minutes apart except around lines 4, 6 and 8, where they are 10 — still covered.
    expect(r.months[0]?.kwh).toBeCloseTo(6, 3);
  });

  it('lists at most five bad rows by line and says how many more', async () => {
    const rows = rowsBetween(Date.UTC(2026, 3, 1), Date.UTC(2026, 3, 1, 2), 5, (ts, i) => ({
      ts: new Date(ts).toISOString(),
      rpm: 240,
      vab: i % 3 === 0 ? 20_000 : 290,
      kw: 6,
      windMs: 8,
    }));
    const r = await energyJson(['--nameplate', windPlatePath, '--log', file('many-bad.csv', csv(WIND_HEADER, rows))]);
    expect(r.rowsSkipped.count).toBe(9);
    expect(r.rowsSkipped.first).toHaveLength(5);
    expect(r.notes.find((n) => n.code === 'rows-skipped')?.message).toMatch(/and 4 more$/);
  });

  it('months are local in the zone --tz names: March 2026 in Oslo has 743 hours', async () => {
    const rows = rowsBetween(Date.UTC(2026, 1, 28, 23), Date.UTC(2026, 2, 31, 22), 5, (ts) => ({
      ts: ts,
      rpm: 240,
      vab: 290,
      kw: 3,
      windMs: 8,
    }));
    const r = await energyJson(['--nameplate', windPlatePath, '--log', file('oslo.csv', csv(WIND_HEADER, rows)), '--tz', 'Europe/Oslo']);
    expect(r.timeZone).toBe('Europe/Oslo');
    expect(r.months[0]?.month).toBe('2026-03');
    expect(r.months[0]?.kwh).toBeCloseTo(3 * 743, 3);
    expect(r.months[0]?.coveragePct).toBe(100);
    expect(r.months[0]?.capacityFactorPct).toBeCloseTo(30, 2);
    expect(r.months[1]?.month).toBe('2026-04');
  });

  it('counts samples without kw or wind speed honestly and never prints NaN', async () => {
    const rows = rowsBetween(Date.UTC(2026, 3, 1), Date.UTC(2026, 3, 1, 1), 1, (ts, i) => ({
      ts: new Date(ts).toISOString(),
      rpm: 240,
      vab: 290,
      kw: i % 20 === 7 ? undefined : 4,
      windMs: i % 30 === 11 ? undefined : 8,
    }));
    const res = await energy(['--nameplate', windPlatePath, '--log', file('holes.csv', csv(WIND_HEADER, rows)), '--json']);
    expect(res.out).not.toMatch(/NaN/);
    const r = JSON.parse(res.out) as Awaited<ReturnType<typeof energyJson>>;
    expect(r.notes.find((n) => n.code === 'samples-without-kw')?.message).toMatch(/^3 of 61 samples have no kw/);
    expect(r.notes.find((n) => n.code === 'samples-without-resource')?.message).toMatch(/^2 of 61 samples have no windMs/);
    // One-minute holes are bridged: the hour stays covered.
    expect(r.months[0]?.kwh).toBeCloseTo(4, 3);
    expect(r.months[0]?.performanceRatio).toBeCloseTo(4 / 5.5, 4);
  });

  it('reports null energy and says why when the log has no kw column', async () => {
    const rows = rowsBetween(Date.UTC(2026, 3, 1), Date.UTC(2026, 3, 1, 1), 5, (ts) => ({ ts: ts, rpm: 240, vab: 290, windMs: 8 }));
    const r = await energyJson(['--nameplate', windPlatePath, '--log', file('no-kw.csv', csv(['ts', 'rpm', 'vab', 'windMs'], rows))]);
    expect(r.months[0]).toMatchObject({ kwh: null, coveragePct: 0, capacityFactorPct: null, availabilityPct: null, performanceRatio: null });
    expect(r.months[0]?.expectedKwh).toBeCloseTo(5.5, 3);
    expect(r.notes.find((n) => n.code === 'no-kw-column')?.severity).toBe('warning');
  });

  it('works out a hydro unit from flow and measured head', async () => {
    const rows = rowsBetween(Date.UTC(2026, 5, 1), Date.UTC(2026, 5, 1, 2), 2, (ts, i) => ({
      ts: new Date(ts).toISOString(),
      rpm: 750,
      vab: 400,
      kw: i < 30 ? 20 : 0,
      flowM3s: 0.3,
      headM: 10,
    }));
    const r = await energyJson([
      '--nameplate',
      hydroPlatePath,
      '--log',
      file('hydro.csv', csv(['ts', 'rpm', 'vab', 'kw', 'flowM3s', 'headM'], rows)),
    ]);
    const m = r.months[0];
    // ρgQHη = 1000 · 9.80665 · 0.3 · 10 · 0.75 W = 22.065 kW, for 2 hours.
    expect(m?.expectedKwh).toBeCloseTo(44.13, 2);
    // 20 kW for samples 0..29 (trapezoid: 29 full intervals of 2 min + half of the 30th).
    expect(m?.kwh).toBeCloseTo((20 * (29 * 2 + 1)) / 60, 3);
    // Delivering samples 0..29: each counts half of each interval beside it: (29 × 2 + 1) min of 120.
    expect(m?.availabilityPct).toBeCloseTo(((29 * 2 + 1) / 120) * 100, 2);
  });

  it('reports an empty log of valid rows with a note and exit 0', async () => {
    const r = await energyJson(['--nameplate', windPlatePath, '--log', file('header-only.csv', 'ts,rpm,vab,kw,windMs\n')]);
    expect(r.months).toEqual([]);
    expect(r.notes.map((n) => n.code)).toEqual(['no-samples']);
  });
});

describe('millrace energy, readable report', () => {
  it('prints a table of months with a dash for figures that cannot be computed', async () => {
    const rows = rowsBetween(Date.UTC(2026, 3, 30, 23), Date.UTC(2026, 4, 1, 1), 10, (ts) => ({
      ts: new Date(ts).toISOString(),
      rpm: 240,
      vab: 290,
      kw: 2,
    }));
    const r = await energy(['--nameplate', windPlatePath, '--log', file('text.csv', csv(['ts', 'rpm', 'vab', 'kw'], rows))]);
    expect(r.status).toBe(0);
    expect(r.err).toBe('');
    const lines = r.out.split('\n');
    expect(lines[0]).toBe('Energy yield of Knoll 2 (knoll-2): wind unit, 10 kW rated');
    expect(r.out).toMatch(/^month\s+kWh\s+coverage %\s+capacity factor %\s+availability %\s+expected kWh\s+performance ratio$/m);
    expect(r.out).toMatch(/^2026-04\s+2\.0\s+0\.1\s+0\.0\s+–\s+–\s+–$/m);
    expect(r.out).toMatch(/^2026-05\s+2\.0\s+0\.1\s+0\.0\s+–\s+–\s+–$/m);
    expect(r.out).toMatch(/^all\s+4\.0\s+/m);
    expect(r.out).toMatch(/warning no-resource-column: the log has no windMs column/);
  });
});

describe('millrace energy, runs that cannot start (exit 2)', () => {
  const good = file('good.csv', csv(WIND_HEADER, [{ ts: '2026-04-01T00:00:00Z', rpm: 1, vab: 1, kw: 1, windMs: 5 }]));

  it('names a missing log file', async () => {
    const missing = join(dir, 'nope.csv');
    const r = await energy(['--nameplate', windPlatePath, '--log', missing]);
    expect(r.status).toBe(2);
    expect(r.err).toBe(`millrace energy: cannot read log ${missing}: no such file\n`);
  });

  it('names a missing required column', async () => {
    const path = file('no-vab.csv', 'ts,rpm,kw\n2026-04-01T00:00:00Z,1,1\n');
    const r = await energy(['--nameplate', windPlatePath, '--log', path]);
    expect(r.status).toBe(2);
    expect(r.err).toContain(`${path}: line 1: required column vab absent`);
  });

  it('names the field of a bad nameplate', async () => {
    const path = file('bad-plate.json', JSON.stringify({ ...windPlate, cutOutMs: undefined, poles: 7 }));
    const r = await energy(['--nameplate', path, '--log', good]);
    expect(r.status).toBe(2);
    expect(r.err).toContain(`${path}: invalid nameplate`);
    expect(r.err).toContain('poles: must be an even number, got 7');
    expect(r.err).toContain('cutOutMs: is required for a wind unit');
  });

  it('names --tz when it is not an IANA zone', async () => {
    const r = await energy(['--nameplate', windPlatePath, '--log', good, '--tz', 'Atlantis/Harbour']);
    expect(r.status).toBe(2);
    expect(r.err).toBe('millrace energy: --tz: must be an IANA time zone such as Europe/Oslo, got "Atlantis/Harbour"\n');
  });

  it('names a missing option and refuses stray arguments', async () => {
    const r1 = await energy(['--log', good]);
    expect(r1.status).toBe(2);
    expect(r1.err).toBe('millrace energy: --nameplate is required\n');
    const r2 = await energy(['--nameplate', windPlatePath, '--log', good, 'extra']);
    expect(r2.status).toBe(2);
    expect(r2.err).toBe('millrace energy: unexpected argument "extra"\n');
  });
});
