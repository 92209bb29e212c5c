/**
 * The live diagnosis against a real database (PGlite, or PostgreSQL when
 * DATABASE_URL is set): units due, windows, verdicts, latest health and
 * history in the health tables, the trend, and the loop's stop.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { rowsOf } from '@/db/client';
import { unitHealthHistory } from '@/db/schema';
import { fleetSchema } from '@/lib/contract/nameplate';
import type { TelemetrySample } from '@/lib/contract/telemetry';
import { upsertFleet } from '@/lib/setup/queries';
import { insertSampleRows, upsertUnitLastSeen } from '@/lib/ingest/queries';
import { inTransaction } from '@/lib/ingest/sql';
import { createLogger } from '@/lib/log/logger';
import { runDiagnosisPass, startDiagnosisWorker } from '@/lib/diagnosis/worker';
import { backendDescription, createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { TEST_NAMEPLATE, syntheticSamples, type SyntheticOptions } from '@/test/support/synthetic-unit';

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
const now = Date.now();
const start = now - 8 * HOUR;
const count = (8 * HOUR) / 10_000;

const UNITS: ReadonlyArray<{ id: string; options: SyntheticOptions; verdict: string }> = [
  { id: 'lv-healthy', options: { ratedLoadKw: 6, statorC: 40 }, verdict: 'healthy' },
  { id: 'lv-demag', options: { fluxFactor: 0.9, ratedLoadKw: 6 }, verdict: 'demagnetised' },
  { id: 'lv-shorted', options: { phaseEmfFactors: [1, 1, 0.93] }, verdict: 'shorted-turns' },
  { id: 'lv-sensor', options: { speedSensorFactor: 0.9 }, verdict: 'speed-sensor-fault' },
  { id: 'lv-idle', options: { speedRange: [0.02, 0.1] }, verdict: 'insufficient-data' },
  // TEST_NAMEPLATE: ratedRpm 300, maxRpm 420. Within the last 6 hours, 20 samples at 1.5 of rated (450 rpm).
  { id: 'lv-overspeed', options: { speedShare: (i) => (i >= 2500 && i < 2520 ? 1.5 : 0.3 + 0.8 * ((i % 360) / 359)) }, verdict: 'healthy' },
];

const fleet = fleetSchema.parse({
  sites: [{ id: 'quessarin-obb', name: 'Quessarin Obb', timezone: 'Europe/Oslo' }],
  units: [...UNITS.map((u) => ({ ...TEST_NAMEPLATE, id: u.id, siteId: 'quessarin-obb' })), { ...TEST_NAMEPLATE, id: 'lv-silent', siteId: 'quessarin-obb' }],
});

let t: TestDatabase;
const keys = new Map<string, number>();

/** Stores samples as the ingester does, received at `receivedAtMs` (before the pass that should see them). */
async function store(unitKey: number, samples: readonly TelemetrySample[], receivedAtMs: number) {
  await inTransaction(t.handle, async (tx) => {
    await insertSampleRows({ tx, rows: samples.map((sample) => ({ unitKey, sample })) });
    const last = Math.max(...samples.map((s) => s.ts));
    await upsertUnitLastSeen({ tx, units: [{ unitKey, lastSampleTsMs: last, lastReceivedAtMs: receivedAtMs }] });
  });
}

async function health() {
  return rowsOf<{ unit_id: string; verdict: string; samples_used: number; ke_ratio: number | null; window_to_ms: number; trend: unknown; detail: unknown }>(
    await t.handle.db.execute(sql`
      select u.id as unit_id, h.verdict::text as verdict, h.samples_used, h.ke_ratio,
             (extract(epoch from h.window_to) * 1000)::float8 as window_to_ms, h.trend, h.detail
      from unit_health h join units u on u.key = h.unit_key order by u.id`),
  );
}

async function historyCount(): Promise<number> {
  const rows = rowsOf<{ n: number | string }>(await t.handle.db.execute(sql`select count(*)::int as n from unit_health_history`));
  return Number(rows[0]!.n);
}

beforeAll(async () => {
  t = await createTestDatabase();
  await upsertFleet({ db: t.handle.db, fleet });
  const rows = rowsOf<{ id: string; key: number }>(await t.handle.db.execute(sql`select id, key from units`));
  for (const r of rows) keys.set(r.id, Number(r.key));
  for (const [i, u] of UNITS.entries()) {
    await store(keys.get(u.id)!, syntheticSamples({ ...u.options, startMs: start, count, seed: i + 1 }), now - 60_000);
  }
});

afterAll(async () => {
  await t?.drop();
});

describe(`live diagnosis (${backendDescription()})`, () => {
  it('diagnoses every unit with samples over its last 6 hours and writes latest health and history', async () => {
    const r = await runDiagnosisPass({ db: t.handle.db, nowMs: now });
    expect(r.units).toBe(UNITS.length);
    expect(r.historyRows).toBe(UNITS.length);
    // 6 h of 10-second samples, both ends included.
    expect(r.samples).toBe(UNITS.length * 2161);
    const rows = await health();
    expect(rows.map((h) => h.unit_id)).toEqual(UNITS.map((u) => u.id).sort());
    for (const u of UNITS) {
      const h = rows.find((x) => x.unit_id === u.id)!;
      expect(h.verdict, u.id).toBe(u.verdict);
      expect(Number(h.window_to_ms)).toBe(start + (count - 1) * 10_000);
    }
    expect(Number(rows.find((h) => h.unit_id === 'lv-demag')!.ke_ratio)).toBeCloseTo(0.9, 2);
    const detail = rows.find((h) => h.unit_id === 'lv-healthy')!.detail as { samplesTotal: number; speedSource: string };
    expect(detail.samplesTotal).toBe(2161);
    expect(await historyCount()).toBe(UNITS.length);
  });

  it('reports speeds above maxRpm as an overspeed alarm in the stored findings, without changing the verdict', async () => {
    const rows = rowsOf<{ unit_id: string; verdict: string; findings: Array<{ code: string; severity: string; message: string }> }>(
      await t.handle.db.execute(sql`select u.id as unit_id, h.verdict::text as verdict, h.findings from unit_health h join units u on u.key = h.unit_key`),
    );
    const over = rows.find((r) => r.unit_id === 'lv-overspeed')!;
    const f = over.findings.find((x) => x.code === 'overspeed');
    expect(f?.severity).toBe('alarm');
    expect(f!.message).toContain('20 samples above the 420 rpm overspeed limit');
    expect(over.verdict).toBe('healthy');
    for (const r of rows.filter((x) => x.unit_id !== 'lv-overspeed')) expect(r.findings.some((x) => x.code === 'overspeed'), r.unit_id).toBe(false);
  });

  it('leaves units alone that received nothing new', async () => {
    const r = await runDiagnosisPass({ db: t.handle.db, nowMs: now + 60_000 });
    expect(r.units).toBe(0);
  });

  it('re-diagnoses a unit with a new sample; history only when due or the verdict changes', async () => {
    const key = keys.get('lv-healthy')!;
    const next = syntheticSamples({ ratedLoadKw: 6, statorC: 40, startMs: start + count * 10_000, count: 1, seed: 99 });
    await store(key, next, now + 90_000);
    const r = await runDiagnosisPass({ db: t.handle.db, nowMs: now + 120_000 });
    expect(r.units).toBe(1);
    expect(r.historyRows).toBe(0);
    expect(await historyCount()).toBe(UNITS.length);
    const h = (await health()).find((x) => x.unit_id === 'lv-healthy')!;
    expect(Number(h.window_to_ms)).toBe(next[0]!.ts);

    await store(key, syntheticSamples({ ratedLoadKw: 6, statorC: 40, startMs: next[0]!.ts + 10_000, count: 1, seed: 98 }), now + HOUR);
    const later = await runDiagnosisPass({ db: t.handle.db, nowMs: now + 2 * HOUR });
    expect(later.historyRows).toBe(1);
    expect(await historyCount()).toBe(UNITS.length + 1);
  });

  it('stores a trend that sees a slow decline in the history and projects its crossing', async () => {
    const key = keys.get('lv-demag')!;
    // Sixty days of history sliding 1 % a month from 0.99 (the unit's last hours read 0.90).
    const rows = Array.from({ length: 60 }, (_, d) => {
      const at = now - (60 - d) * DAY;
      return {
        unitKey: key,
        diagnosedAt: new Date(at),
        windowFrom: new Date(at - 6 * HOUR),
        windowTo: new Date(at),
        verdict: 'healthy' as const,
        samplesUsed: 2000,
        keRatio: 0.99 - (0.01 * d) / 30 + 0.001 * Math.sin(d * 1.7),
        findings: [],
        detail: {},
      };
    });
    await t.handle.db.insert(unitHealthHistory).values(rows);
    await store(key, syntheticSamples({ fluxFactor: 0.9, startMs: start + count * 10_000, count: 1, seed: 5 }), now + 2 * HOUR);
    const r = await runDiagnosisPass({ db: t.handle.db, nowMs: now + 3 * HOUR });
    expect(r.units).toBe(1);
    expect(r.historyRows).toBe(1);
    const trend = (await health()).find((x) => x.unit_id === 'lv-demag')!.trend as Record<string, unknown>;
    expect(trend.status).toBe('declining');
    expect(trend.slopePctPerMonth as number).toBeLessThan(-0.5);
    expect(typeof trend.crossingAt).toBe('string');
    expect(Date.parse(trend.crossingAt as string)).toBeGreaterThan(now);
  });

  it('the loop runs a pass at once and its stop waits for it', async () => {
    const key = keys.get('lv-sensor')!;
    await store(key, syntheticSamples({ speedSensorFactor: 0.9, startMs: start + count * 10_000, count: 1, seed: 7 }), Date.now() - 1000);
    const lines: string[] = [];
    const stop = startDiagnosisWorker({ db: t.handle.db, intervalS: 3600, windowHours: 6, log: createLogger('diagnosis', 'info', (l) => lines.push(l)) });
    await stop();
    const pass = lines.map((l) => JSON.parse(l)).find((l) => l.msg === 'diagnosis pass');
    expect(pass?.units).toBe(1);
    expect((await runDiagnosisPass({ db: t.handle.db })).units).toBe(0);
  });
});
