import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { QUARANTINE_COUNT_CAP, getQuarantineSummary } from '@/lib/quality/queries';

let testDb: TestDatabase;
beforeAll(async () => {
  testDb = await createTestDatabase();
});
afterAll(async () => {
  await testDb?.drop();
});

describe('the set-aside summary of the fleet page', () => {
  it('counts exactly up to the cap, the last day apart, newest reasons first', async () => {
    const db = testDb.handle.db;
    await db.execute(sql`insert into quarantine (received_at, topic, payload, payload_bytes, reason)
      select now() - interval '3 days', 'millrace/fell-top/ft-01/telemetry', '{}', 2, 'old reason ' || g from generate_series(1, 40) g`);
    await db.execute(sql`insert into quarantine (received_at, topic, payload, payload_bytes, reason)
      select now() - interval '1 hour', 'millrace/fell-top/ft-02/telemetry', '{}', 2, 'rpm: reason ' || g from generate_series(1, 7) g`);
    const summary = await getQuarantineSummary({ db, recentLimit: 3 });
    expect(summary.total).toBe(47);
    expect(summary.lastDay).toBe(7);
    expect(summary.recent.map((r) => r.reason)).toEqual(['rpm: reason 7', 'rpm: reason 6', 'rpm: reason 5']);
  });

  it('stops counting past the cap (a flooding device does not make each render scan the table)', async () => {
    const db = testDb.handle.db;
    await db.execute(sql`insert into quarantine (received_at, topic, payload, payload_bytes, reason)
      select now(), 'millrace/fell-top/ft-03/telemetry', '{}', 2, 'flood' from generate_series(1, ${QUARANTINE_COUNT_CAP + 500}) g`);
    const summary = await getQuarantineSummary({ db });
    expect(summary.total).toBe(QUARANTINE_COUNT_CAP + 1);
    expect(summary.lastDay).toBe(QUARANTINE_COUNT_CAP + 1);
  });
});
