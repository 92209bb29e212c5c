/**
 * The data-quality screen's reads of set-aside telemetry: newest first, a
 * page at a time with a cursor that neither skips nor repeats, filtered by
 * site and unit, scoped to the viewer's sites, and counts per unit over the
 * last 24 h that stop at a cap.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { LOCAL_VIEWER } from '@/lib/auth/viewer';
import { getQuarantineCountsByUnit, getQuarantinePage, type QuarantineCursor } from '@/lib/quality/queries';
import { readDataQualityScreen } from '@/lib/quality/screen';
import { createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { queryRows, registerFleet, testFleet, testTag } from '@/test/support/ingest';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 2, hydroUnits: 1 });
const [w1, w2, h1] = fleet.units as [(typeof fleet.units)[0], (typeof fleet.units)[0], (typeof fleet.units)[0]];
const now = Date.now();
let t: TestDatabase;

beforeAll(async () => {
  t = await createTestDatabase();
  await registerFleet(t.handle, fleet);
  const rows: Array<[number, string | null, string | null, string]> = [];
  // w1: 30 in the last hour; w2: 3 in the last day and 4 two days ago; h1: 1; a bad topic: 2.
  for (let i = 0; i < 30; i++) rows.push([now - i * 60_000, w1.siteId, w1.id, `rpm: -${i} rev/min is below 0, outside physical sense`]);
  for (let i = 0; i < 3; i++) rows.push([now - 3_600_000 * (2 + i), w2.siteId, w2.id, 'vab: expected a number of volts, got "x"']);
  for (let i = 0; i < 4; i++) rows.push([now - 2 * 86_400_000 - i * 1000, w2.siteId, w2.id, 'old reason']);
  rows.push([now - 5_000, h1.siteId, h1.id, 'payload is not JSON']);
  rows.push([now - 7_000, null, null, 'topic is not a millrace unit topic']);
  rows.push([now - 8_000, null, null, 'topic is not a millrace unit topic']);
  for (const [ms, site, unit, reason] of rows) {
    await queryRows(t.handle, `insert into quarantine (received_at, topic, site_id, unit_id, sample_index, payload, payload_bytes, reason)
      values (to_timestamp($1::float8 / 1000), $2, $3, $4, null, $5, $6, $7)`, [ms, `millrace/${site ?? 'x'}/${unit ?? 'y'}/telemetry`, site, unit, '{"rpm":-1}', 10, reason]);
  }
});

afterAll(async () => {
  await t?.drop();
});

describe('set-aside telemetry, a page at a time', () => {
  it('walks every entry newest first, pages neither skipping nor repeating', async () => {
    const seen: number[] = [];
    const times: number[] = [];
    let before: QuarantineCursor | undefined;
    for (let pages = 0; pages < 10; pages++) {
      const page = await getQuarantinePage({ db: t.handle.db, viewer: LOCAL_VIEWER, before, limit: 7 });
      expect(page.entries.length).toBeLessThanOrEqual(7);
      for (const e of page.entries) {
        seen.push(e.id);
        times.push(e.receivedAt.getTime());
      }
      if (!page.next) break;
      before = page.next;
    }
    expect(seen).toHaveLength(40);
    expect(new Set(seen).size).toBe(40);
    expect([...times].sort((a, b) => b - a)).toEqual(times);
  });

  it('filters by unit, and keeps rows of no registered site from a viewer of only some sites', async () => {
    const unit = await getQuarantinePage({ db: t.handle.db, viewer: LOCAL_VIEWER, siteId: w2.siteId, unitId: w2.id });
    expect(unit.entries.map((e) => e.unitId)).toEqual(Array(7).fill(w2.id));
    expect(unit.entries[0]!.timezone).toBe('Europe/Oslo');
    const some = await getQuarantinePage({ db: t.handle.db, viewer: { id: 'c', role: 'crew', siteIds: [h1.siteId] }, limit: 100 });
    expect(some.entries.map((e) => e.unitId)).toEqual([h1.id]);
    const all = await getQuarantinePage({ db: t.handle.db, viewer: LOCAL_VIEWER, limit: 100 });
    expect(all.entries.filter((e) => e.siteId === null)).toHaveLength(2);
  });
});

describe('set-aside telemetry per unit over the last 24 hours', () => {
  it('counts each unit, most first, with its newest reason, leaving out older rows', async () => {
    const counts = await getQuarantineCountsByUnit({ db: t.handle.db, viewer: LOCAL_VIEWER, nowMs: now + 1000 });
    expect(counts.units.map((u) => [u.unitId, u.count])).toEqual([
      [w1.id, 30],
      [w2.id, 3],
      [null, 2],
      [h1.id, 1],
    ]);
    expect(counts.units[0]!.lastReason).toBe('rpm: -0 rev/min is below 0, outside physical sense');
    expect(counts).toMatchObject({ total: 36, capped: false });
  });

  it('stops counting at the cap and says so', async () => {
    const counts = await getQuarantineCountsByUnit({ db: t.handle.db, viewer: LOCAL_VIEWER, nowMs: now + 1000, cap: 10 });
    expect(counts).toMatchObject({ total: 10, capped: true });
  });

  it('builds the screen: a bad search parameter is named and dropped, rows link to their unit, the pager walks on', async () => {
    const bad = await readDataQualityScreen({ db: t.handle.db, viewer: LOCAL_VIEWER, search: { site: 'Not A Slug!' } });
    expect(bad.problem).toBe('site: not a site id (1 to 64 of a-z, 0-9 and -)');
    expect(bad.what).toBe('all sites');
    expect(bad.filtered).toBe(false);
    const screen = await readDataQualityScreen({ db: t.handle.db, viewer: LOCAL_VIEWER, search: { unit: w1.id, site: [w1.siteId, 'other'] } });
    expect(screen.problem).toBeUndefined();
    expect(screen.what).toBe(`unit ${w1.id}`);
    expect(screen.counts.rows.map((r) => [r.label, r.href])).toEqual([[`${w1.siteId}/${w1.id}`, `/data-quality?site=${w1.siteId}&unit=${w1.id}`]]);
    expect(screen.entries).toHaveLength(25);
    expect(screen.newestHref).toBeUndefined();
    expect(screen.olderHref).toMatch(new RegExp(`^/data-quality\\?site=${w1.siteId}&unit=${w1.id}&before=\\d+-\\d+$`));
    const older = await readDataQualityScreen({ db: t.handle.db, viewer: LOCAL_VIEWER, search: { site: w1.siteId, unit: w1.id, before: new URL(screen.olderHref!, 'http://x').searchParams.get('before')! } });
    expect(older.entries).toHaveLength(5);
    expect(older.newestHref).toBe(`/data-quality?site=${w1.siteId}&unit=${w1.id}`);
    expect(older.olderHref).toBeUndefined();
  });
});
