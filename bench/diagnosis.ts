/**
 * Benchmark of the live diagnosis: seeds UNITS units (default 1,000) with
 * HOURS hours (default 6) of 10-second samples made by the forward generator
 * model, a few of them with faults, then times one diagnosis pass over all of
 * them. With DATABASE_URL it works in a fresh database on that server,
 * created here and dropped at the end; without, in an embedded in-memory
 * PGlite. Prints figures; asserts nothing. The last line reads
 * `diagnosis: <N> units in <S> s`.
 *
 *   npm run bench:diagnosis [-- UNITS [HOURS]]
 */
import { randomBytes } from 'node:crypto';
import postgres from 'postgres';
import { openDatabase, type DatabaseHandle } from '@/db/client';
import { fleetSchema } from '@/lib/contract/nameplate';
import type { TelemetrySample } from '@/lib/contract/telemetry';
import { upsertFleet } from '@/lib/setup/queries';
import { insertSampleRows, upsertUnitLastSeen, type SampleRow, type UnitSeen } from '@/lib/ingest/queries';
import { inTransaction } from '@/lib/ingest/sql';
import { runDiagnosisPass } from '@/lib/diagnosis/worker';
import { generatorTerminals } from '@/lib/physics/generator-model';

const unitCount = Number(process.argv[2] ?? 1000);
const hours = Number(process.argv[3] ?? 6);
if (!Number.isInteger(unitCount) || unitCount < 1) throw new RangeError(`UNITS must be a whole number of at least 1, got ${process.argv[2]}`);
if (!(hours > 0)) throw new RangeError(`HOURS must be above 0, got ${process.argv[3]}`);
const STEP_MS = 10_000;
const UNITS_PER_SITE = 25;
const UNITS_PER_INSERT = 10;

/** Deterministic numbers (mulberry32), so every run seeds the same fleet. */
function random(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = Math.imul(a ^ (a >>> 15), a | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Two invented designs: a 10 kW wind set and a 15 kW hydro set. */
function nameplateOf(i: number) {
  const siteId = `bench-site-${String(Math.floor(i / UNITS_PER_SITE) + 1).padStart(3, '0')}`;
  const id = `bench-unit-${String(i + 1).padStart(4, '0')}`;
  if (i % 5 === 4) {
    return {
      id, siteId, kind: 'hydro', ratedKw: 15, ratedRpm: 750, maxRpm: 1400, poles: 8, keVPerKrpm: 560, magnet: 'ferrite',
      phaseOhm: 0.2, phaseMh: 1.5, designHeadM: 24, designFlowM3s: 0.09, efficiency: 0.7,
    };
  }
  return {
    id, siteId, kind: 'wind', ratedKw: 10, ratedRpm: 300, maxRpm: 420, poles: 24, keVPerKrpm: 1400, magnet: 'ndfeb',
    phaseOhm: 0.35, phaseMh: 8, powerCurve: [{ ms: 3, kw: 0.2 }, { ms: 11, kw: 10 }], cutInMs: 3, cutOutMs: 25, rotorDiameterM: 7,
  };
}

const fleet = fleetSchema.parse({
  sites: Array.from({ length: Math.ceil(unitCount / UNITS_PER_SITE) }, (_, s) => ({
    id: `bench-site-${String(s + 1).padStart(3, '0')}`,
    name: `Bench site ${s + 1}`,
    timezone: 'Europe/Oslo',
  })),
  units: Array.from({ length: unitCount }, (_, i) => nameplateOf(i)),
});

/** HOURS of samples of unit `i`, ending at `endMs`; every 40th unit demagnetised, every 50th with a shorted turn, every 60th with a bad speed sensor. */
function samplesOf(i: number, endMs: number): TelemetrySample[] {
  const np = fleet.units[i]!;
  const next = random(i + 1);
  const noise = () => 1 + 0.002 * (next() + next() + next() - 1.5);
  const n = Math.floor((hours * 3_600_000) / STEP_MS);
  const out: TelemetrySample[] = new Array(n);
  let share = 0.3 + 0.6 * next();
  const fluxFactor = i % 40 === 7 ? 0.9 : 1;
  const phaseEmfFactors: [number, number, number] = i % 50 === 11 ? [1, 0.93, 1] : [1, 1, 1];
  const sensor = i % 60 === 13 ? 1.08 : 1;
  const statorC = 15 + 30 * next();
  for (let k = 0; k < n; k++) {
    share = Math.min(1.1, Math.max(0.1, share + 0.03 * (next() - 0.5)));
    const rpm = np.ratedRpm * share;
    const kw = Math.min(np.ratedKw, 0.8 * np.ratedKw * share ** 3);
    const r = generatorTerminals(np, { rpm, kw, powerFactor: 0.95, magnetC: statorC, windingC: statorC, fluxFactor, phaseEmfFactors });
    if (r === undefined) throw new RangeError(`unit ${np.id}: ${kw} kW cannot be carried at ${rpm} rpm`);
    out[k] = {
      ts: endMs - (n - 1 - k) * STEP_MS,
      rpm: rpm * sensor * noise(),
      hz: r.hz * noise(),
      vab: r.vab * noise(),
      vbc: r.vbc * noise(),
      vca: r.vca * noise(),
      ia: r.ia * noise(),
      ib: r.ib * noise(),
      ic: r.ic * noise(),
      kw: r.kw * noise(),
      statorC,
      ambientC: statorC - 10,
    };
  }
  return out;
}

async function freshDatabase(): Promise<{ handle: DatabaseHandle; where: string; drop: () => Promise<void> }> {
  const serverUrl = process.env.DATABASE_URL;
  if (!serverUrl) {
    const handle = await openDatabase({ dataDir: 'memory://' });
    return { handle, where: 'embedded PGlite in memory (set DATABASE_URL for PostgreSQL)', drop: () => handle.close() };
  }
  const name = `millrace_bench_${randomBytes(4).toString('hex')}`;
  const admin = postgres(serverUrl, { max: 1, onnotice: () => {} });
  await admin.unsafe(`create database "${name}"`);
  await admin.end();
  const url = new URL(serverUrl);
  url.pathname = `/${name}`;
  const handle = await openDatabase({ url: url.toString(), maxConnections: 8 });
  return {
    handle,
    where: `PostgreSQL database ${name} on ${url.host} (dropped at the end)`,
    drop: async () => {
      await handle.close();
      const again = postgres(serverUrl, { max: 1, onnotice: () => {} });
      await again.unsafe(`drop database if exists "${name}" with (force)`);
      await again.end();
    },
  };
}

const db = await freshDatabase();
try {
  process.stdout.write(`database: ${db.where}\n`);
  const seedStart = Date.now();
  await upsertFleet({ db: db.handle.db, fleet });
  const keys = new Map<string, number>();
  for (const row of await db.handle.db.query.units.findMany({ columns: { id: true, key: true } })) keys.set(row.id, row.key);
  // Samples end a minute ago, as a live fleet's would.
  const endMs = Date.now() - 60_000;
  let rows = 0;
  for (let first = 0; first < unitCount; first += UNITS_PER_INSERT) {
    const batch: SampleRow[] = [];
    const seen: UnitSeen[] = [];
    for (let i = first; i < Math.min(unitCount, first + UNITS_PER_INSERT); i++) {
      const unitKey = keys.get(fleet.units[i]!.id)!;
      for (const sample of samplesOf(i, endMs)) batch.push({ unitKey, sample });
      seen.push({ unitKey, lastSampleTsMs: endMs, lastReceivedAtMs: endMs });
    }
    await inTransaction(db.handle, async (tx) => {
      await insertSampleRows({ tx, rows: batch });
      await upsertUnitLastSeen({ tx, units: seen });
    });
    rows += batch.length;
  }
  process.stdout.write(`seeded: ${unitCount} units, ${rows.toLocaleString('en-US')} samples (${hours} h at 10 s) in ${((Date.now() - seedStart) / 1000).toFixed(1)} s\n`);

  const pass = await runDiagnosisPass({ db: db.handle.db });
  const verdicts = Object.entries(pass.verdicts)
    .map(([v, n]) => `${v} ${n}`)
    .join(', ');
  process.stdout.write(`samples read: ${pass.samples.toLocaleString('en-US')}; history rows: ${pass.historyRows}; verdicts: ${verdicts}\n`);
  const idle = await runDiagnosisPass({ db: db.handle.db });
  process.stdout.write(`next pass with nothing new: ${idle.units} units in ${(idle.elapsedMs / 1000).toFixed(3)} s\n`);
  process.stdout.write(`diagnosis: ${pass.units} units in ${(pass.elapsedMs / 1000).toFixed(2)} s\n`);
} finally {
  await db.drop();
}
