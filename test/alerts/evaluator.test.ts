/**
 * The evaluator on a real database (PGlite, or PostgreSQL when present): an
 * overspeed in the newest rollup opens one alert (contract section 7:
 * `overspeed`, rpm above maxRpm) with its event; evaluating again, from a
 * second evaluator at once, or after a restart never raises it twice; the
 * condition gone clears it only after the hold-off; a unit registered and
 * silent is offline only after the offline time.
 */
import { eq, sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { telemetryRollups10m, unitAlertEvents, unitAlerts, units, unitStatus } from '@/db/schema';
import { evaluateAlerts } from '@/lib/alerts/evaluator';
import { CONDITION_TIMING } from '@/lib/alerts/limits';
import { createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { registerFleet, testFleet, testTag } from '@/test/support/ingest';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 2, hydroUnits: 0 });
const [fast, calm] = fleet.units as [(typeof fleet.units)[0], (typeof fleet.units)[0]];
let t: TestDatabase;
let fastKey = 0;
let calmKey = 0;
const T0 = Date.UTC(2026, 11, 4, 12, 0, 0);

async function rollup(unitKey: number, bucketMs: number, rpmMax: number): Promise<void> {
  await t.handle.db
    .insert(telemetryRollups10m)
    .values({ unitKey, bucketStart: new Date(bucketMs), samples: 60, firstTs: new Date(bucketMs), lastTs: new Date(bucketMs + 590_000), coveredS: 600, rpmMax, rpmMin: 100, rpmSum: 60 * 150, statorCMax: 60 })
    .onConflictDoUpdate({ target: [telemetryRollups10m.unitKey, telemetryRollups10m.bucketStart], set: { rpmMax } });
}

async function seen(unitKey: number, atMs: number): Promise<void> {
  await t.handle.db
    .insert(unitStatus)
    .values({ unitKey, lastSampleTs: new Date(atMs), lastReceivedAt: new Date(atMs), presence: 'online', presenceAt: new Date(atMs) })
    .onConflictDoUpdate({ target: unitStatus.unitKey, set: { lastSampleTs: new Date(atMs), lastReceivedAt: new Date(atMs) } });
}

const alertsOf = (unitKey: number) => t.handle.db.select().from(unitAlerts).where(eq(unitAlerts.unitKey, unitKey));

beforeAll(async () => {
  t = await createTestDatabase();
  await registerFleet(t.handle, fleet);
  const rows = await t.handle.db.select({ key: units.key, id: units.id }).from(units);
  fastKey = rows.find((r) => r.id === fast.id)!.key;
  calmKey = rows.find((r) => r.id === calm.id)!.key;
  // Registered a day before the test's clock, reporting until now.
  await t.handle.db.execute(sql`update units set created_at = ${new Date(T0 - 86_400_000).toISOString()}::timestamptz`);
  await seen(fastKey, T0 - 5_000);
  await seen(calmKey, T0 - 5_000);
}, 60_000);

afterAll(async () => {
  await t?.drop();
});

describe('alert evaluator', () => {
  it('opens one overspeed alert, once, whoever evaluates and however often', async () => {
    await rollup(fastKey, T0 - 600_000, fast.maxRpm + 20);
    await rollup(calmKey, T0 - 600_000, fast.maxRpm - 50);
    const [a, b] = await Promise.all([evaluateAlerts({ db: t.handle.db, nowMs: T0 }), evaluateAlerts({ db: t.handle.db, nowMs: T0 })]);
    expect(a.opened + b.opened).toBe(1);
    await evaluateAlerts({ db: t.handle.db, nowMs: T0 + 15_000 });
    const alerts = await alertsOf(fastKey);
    expect(alerts.map((x) => [x.condition, x.state, x.severity, x.value, x.limitValue])).toEqual([['overspeed', 'active', 'alarm', fast.maxRpm + 20, fast.maxRpm]]);
    expect(alerts[0]!.message).toBe(`Speed reached ${fast.maxRpm + 20} rpm in the last 10 minutes; the overspeed limit is ${fast.maxRpm} rpm.`);
    const events = await t.handle.db.select().from(unitAlertEvents).where(eq(unitAlertEvents.alertId, alerts[0]!.id));
    expect(events.map((e) => [e.type, e.fromState, e.toState, e.actor])).toEqual([['opened', null, 'active', 'evaluator']]);
    expect(await alertsOf(calmKey)).toEqual([]);
  });

  it('clears only once the speed has been under the line for the hold-off, and a return before re-opens it', async () => {
    const holdOff = CONDITION_TIMING.overspeed.holdOffMs;
    await seen(fastKey, T0 + 30 * 60_000);
    // The overspeed bucket is now older than the 20 minutes read; the newest is calm.
    await rollup(fastKey, T0 + 29 * 60_000, fast.maxRpm - 60);
    const goneAt = T0 + 30 * 60_000;
    await evaluateAlerts({ db: t.handle.db, nowMs: goneAt });
    let [alert] = await alertsOf(fastKey);
    expect(alert!.state).toBe('active');
    expect(alert!.goneSince?.getTime()).toBe(goneAt);
    await rollup(fastKey, T0 + 31 * 60_000, fast.maxRpm + 5);
    await seen(fastKey, T0 + 32 * 60_000);
    await evaluateAlerts({ db: t.handle.db, nowMs: T0 + 32 * 60_000 });
    [alert] = await alertsOf(fastKey);
    expect(alert!.goneSince).toBeNull();
    const types = (await t.handle.db.select().from(unitAlertEvents).where(eq(unitAlertEvents.alertId, alert!.id))).map((e) => e.type);
    expect(types).toEqual(['opened', 'reopened']);
    // Calm from here on: gone at +55 min (no bucket in the last 20 minutes above the line), cleared a hold-off later.
    const calmFrom = T0 + 55 * 60_000;
    await seen(fastKey, calmFrom + holdOff);
    await rollup(fastKey, T0 + 50 * 60_000, fast.maxRpm - 60);
    await evaluateAlerts({ db: t.handle.db, nowMs: calmFrom });
    await evaluateAlerts({ db: t.handle.db, nowMs: calmFrom + holdOff - 1 });
    expect((await alertsOf(fastKey))[0]!.state).toBe('active');
    await evaluateAlerts({ db: t.handle.db, nowMs: calmFrom + holdOff });
    const after = await alertsOf(fastKey);
    expect(after.map((x) => [x.state, x.clearedAt?.getTime()])).toEqual([['cleared', calmFrom + holdOff]]);
  });

  it('calls a silent unit offline after the offline time, and only once however often it runs', async () => {
    const silentFrom = T0 + 3 * 3_600_000;
    for (const ms of [silentFrom, silentFrom + 60_000, silentFrom + 120_000]) await evaluateAlerts({ db: t.handle.db, nowMs: ms });
    const offline = (await alertsOf(calmKey)).filter((a) => a.condition === 'offline');
    expect(offline).toHaveLength(1);
    expect(offline[0]!.message).toMatch(/^No sample for \d+ minutes \(offline after 15\)\.$/);
  });
});
