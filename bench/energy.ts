/**
 * Benchmark of `millrace energy`: writes a CSV log of a wind unit (1,000,000
 * rows by default, 30 s apart, about a year; 1 % of rows moved out of time
 * order so the sort runs), then times the whole command through main() and
 * the pure monthly integration alone. Prints figures; asserts nothing.
 *
 *   npm run bench:energy [-- ROWS]
 */
import { mkdtempSync, rmSync, writeFileSync, createWriteStream } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { once } from 'node:events';
import { main } from '@/lib/cli/main';
import { energySamplesFrom } from '@/lib/energy/energy-samples';
import { monthlyEnergy } from '@/lib/energy/monthly-energy';

const rows = Number(process.argv[2] ?? 1_000_000);
if (!Number.isInteger(rows) || rows < 2) throw new RangeError(`ROWS must be a whole number of 2 or more, got ${process.argv[2]}`);

const nameplate = {
  id: 'bench-unit',
  siteId: 'bench-site',
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
    { ms: 14, kw: 10.2 },
  ],
  cutInMs: 3,
  cutOutMs: 25,
  rotorDiameterM: 7,
} as const;

const dir = mkdtempSync(join(tmpdir(), 'millrace-bench-energy-'));
try {
  const platePath = join(dir, 'unit.json');
  writeFileSync(platePath, JSON.stringify(nameplate));
  const logPath = join(dir, 'log.csv');
  const start = Date.UTC(2025, 0, 1);
  const out = createWriteStream(logPath);
  out.write('ts,rpm,vab,kw,windMs,airKgM3\n');
  let batch = '';
  for (let i = 0; i < rows; i++) {
    // Every 100th row swaps with the next, so the log is not in time order.
    const k = i % 100 === 0 && i + 1 < rows ? i + 1 : i % 100 === 1 && i > 0 ? i - 1 : i;
    const windMs = 6 + 5 * Math.sin(k / 2000) + 2 * Math.sin(k / 37);
    const kw = Math.max(0, Math.min(10, (windMs - 3) * 1.25));
    batch += `${new Date(start + k * 30_000).toISOString()},${(windMs * 25).toFixed(1)},${(windMs * 30).toFixed(1)},${kw.toFixed(3)},${windMs.toFixed(2)},1.2\n`;
    if (batch.length > 1 << 20) {
      if (!out.write(batch)) await once(out, 'drain');
      batch = '';
    }
  }
  out.end(batch);
  await once(out, 'finish');

  let peakRss = process.memoryUsage().rss;
  const timer = setInterval(() => {
    peakRss = Math.max(peakRss, process.memoryUsage().rss);
  }, 20);
  const sink = new Writable({ write: (_chunk, _enc, done) => done() });
  const t0 = performance.now();
  const status = await main(['energy', '--nameplate', platePath, '--log', logPath, '--json'], { stdout: sink, stderr: process.stderr });
  const commandMs = performance.now() - t0;
  clearInterval(timer);
  peakRss = Math.max(peakRss, process.memoryUsage().rss);

  // The pure part alone: collecting, sorting and integrating samples already in memory.
  const samples = Array.from({ length: rows }, (_, i) => ({ ts: start + i * 30_000, kw: 5, windMs: 8, airKgM3: 1.2 }));
  const t1 = performance.now();
  const collected = energySamplesFrom({ ...nameplate, powerCurve: [...nameplate.powerCurve] }, samples);
  const months = monthlyEnergy(collected.samples, { ratedKw: nameplate.ratedKw, timeZone: 'Europe/Oslo' });
  const pureMs = performance.now() - t1;

  process.stdout.write(
    [
      `millrace energy on ${rows.toLocaleString('en-US')} rows: exit ${status}, ${(commandMs / 1000).toFixed(2)} s, ` +
        `${Math.round((rows / commandMs) * 1000).toLocaleString('en-US')} rows/s, peak RSS ${(peakRss / 2 ** 20).toFixed(0)} MiB`,
      `energy library alone (collect, integrate ${months.length} months in Europe/Oslo): ${(pureMs / 1000).toFixed(2)} s`,
      '',
    ].join('\n'),
  );
} finally {
  rmSync(dir, { recursive: true, force: true });
}
