/**
 * The alert list, one alert's page, people's changes and `GET /api/v1/alerts`
 * on a real database: scoped to the viewer's sites (another site's alert is
 * not there, by list or by id), the crews' list keeping a cleared alert
 * nobody acknowledged (contract section 7), filters with a bad one named and
 * dropped, several acknowledged at once, shelving refusing a past end and a
 * missing reason by field, the history in order, and the API's answer in the
 * contract's shape (sections 6 and 7).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Viewer } from '@/lib/auth/viewer';
import { alertsAnswer } from '@/lib/alerts/api';
import { acknowledgeAlerts, shelveOneAlert } from '@/lib/alerts/changes';
import { acknowledgeAlert, openAlert, type AlertLife } from '@/lib/alerts/lifecycle';
import { countOpenAlertsBySite, getAlertById, getAlerts, getUnitAlerts } from '@/lib/alerts/queries';
import { readAlertScreen, readAlertsScreen } from '@/lib/alerts/screen';
import { readUnitScreen } from '@/lib/units/screen';
import { insertAlert, updateAlert, type AlertOpening } from '@/lib/alerts/store';
import { SAFETY_CAUTION } from '@/lib/diagnosis/findings';
import { createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { queryRows, registerFleet, testFleet, testTag } from '@/test/support/ingest';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 2, hydroUnits: 1 });
const [w1, w2, h1] = fleet.units as [(typeof fleet.units)[0], (typeof fleet.units)[0], (typeof fleet.units)[0]];
const siteA = w1.siteId;
const siteB = h1.siteId;
const HOUR = 3_600_000;
const now = Date.now();
let t: TestDatabase;
const ids: Record<'overspeed' | 'offlineCleared' | 'hotTaken' | 'bad' | 'stale', number> = { overspeed: 0, offlineCleared: 0, hotTaken: 0, bad: 0, stale: 0 };

const crewA: Viewer = { id: 'person:crew-a', role: 'crew', siteIds: [siteA], email: `crew-a-${tag}@test.invalid`, via: 'session' };
const crewB: Viewer = { id: 'person:crew-b', role: 'crew', siteIds: [siteB], email: `crew-b-${tag}@test.invalid`, via: 'session' };
const ownerA: Viewer = { id: 'person:owner-a', role: 'owner', siteIds: [siteA], email: `owner-${tag}@test.invalid`, via: 'session' };
const operator: Viewer = { id: 'person:op', role: 'operator', siteIds: 'all', email: `op-${tag}@test.invalid`, via: 'session' };

async function keyOf(unitId: string): Promise<number> {
  const [row] = await queryRows<{ key: number }>(t.handle, 'select key from units where id = $1', [unitId]);
  return Number(row!.key);
}

async function open(unitId: string, opening: Omit<AlertOpening, 'unitKey'>, openedMs: number): Promise<number> {
  const row = await insertAlert({ db: t.handle.db, opening: { ...opening, unitKey: await keyOf(unitId) }, step: openAlert(openedMs), nowMs: openedMs });
  return row!.id;
}

/** The evaluator's clearing, by hand: gone past the hold-off at `atMs`. */
async function clear(alertId: number, atMs: number): Promise<void> {
  await updateAlert({
    db: t.handle.db,
    alertId,
    actor: { label: 'evaluator' },
    nowMs: atMs,
    next: (life: AlertLife) => ({
      life: { ...life, state: 'cleared', clearedAtMs: atMs, changedAtMs: atMs, goneSinceMs: atMs - 60_000 },
      changes: [{ type: 'cleared', from: life.state, to: 'cleared' }],
    }),
  });
}

beforeAll(async () => {
  t = await createTestDatabase();
  await registerFleet(t.handle, fleet);
  ids.stale = await open(w1.id, { condition: 'demagnetisation', severity: 'warning', message: 'Ke is 8 % below nameplate.', value: 0.92, limit: 0.95 }, now - 26 * HOUR);
  ids.overspeed = await open(w1.id, { condition: 'overspeed', severity: 'alarm', message: 'Speed reached 431 rpm; the limit is 420 rpm.', value: 431.4, limit: 420 }, now - 3 * HOUR);
  ids.offlineCleared = await open(w2.id, { condition: 'offline', severity: 'warning', message: 'No sample for 20 minutes.', value: 20, limit: 15 }, now - 2 * HOUR);
  await clear(ids.offlineCleared, now - 90 * 60_000);
  ids.hotTaken = await open(w1.id, { condition: 'stator-temperature', severity: 'alarm', message: 'Stator reached 141 °C.', value: 141, limit: 135 }, now - HOUR);
  await updateAlert({ db: t.handle.db, alertId: ids.hotTaken, actor: { label: 'someone@test.invalid' }, nowMs: now - 50 * 60_000, next: (life) => acknowledgeAlert(life, now - 50 * 60_000) });
  await clear(ids.hotTaken, now - 40 * 60_000);
  ids.bad = await open(h1.id, { condition: 'bad-telemetry', severity: 'warning', message: '12 messages set aside.', value: 12, limit: 5 }, now - 30 * 60_000);
});

afterAll(async () => {
  await t?.drop();
});

describe('alert queries, scoped to the viewer', () => {
  it("keeps a cleared alert nobody acknowledged in the crews' list, newest opened first", async () => {
    const active = await getAlerts({ db: t.handle.db, viewer: crewA, state: 'active' });
    expect(active.alerts.map((a) => a.row.id)).toEqual([ids.offlineCleared, ids.overspeed, ids.stale]);
    const all = await getAlerts({ db: t.handle.db, viewer: crewA, state: 'all' });
    expect(all.alerts.map((a) => a.row.id)).toEqual([ids.hotTaken, ids.offlineCleared, ids.overspeed, ids.stale]);
  });

  it("shows another site's crew nothing of site A, by list or by id", async () => {
    const list = await getAlerts({ db: t.handle.db, viewer: crewB, state: 'all' });
    expect(list.alerts.map((a) => a.row.id)).toEqual([ids.bad]);
    expect(await getAlertById({ db: t.handle.db, viewer: crewB, alertId: ids.overspeed })).toBeUndefined();
    expect(await readAlertScreen({ db: t.handle.db, viewer: crewB, nowMs: now, alertId: String(ids.overspeed) })).toBeUndefined();
    expect(await getUnitAlerts({ db: t.handle.db, viewer: crewB, siteId: siteA, unitId: w1.id })).toEqual([]);
    expect(await getAlerts({ db: t.handle.db, viewer: { ...crewB, siteIds: [] }, state: 'all' })).toEqual({ alerts: [], next: undefined });
  });

  it('pages with a cursor that neither skips nor repeats, and reads a unit alone', async () => {
    const first = await getAlerts({ db: t.handle.db, viewer: operator, state: 'all', limit: 2 });
    const second = await getAlerts({ db: t.handle.db, viewer: operator, state: 'all', limit: 2, before: first.next });
    const third = await getAlerts({ db: t.handle.db, viewer: operator, state: 'all', limit: 2, before: second.next });
    expect([...first.alerts, ...second.alerts, ...third.alerts].map((a) => a.row.id)).toEqual([ids.bad, ids.hotTaken, ids.offlineCleared, ids.overspeed, ids.stale]);
    expect(third.next).toBeUndefined();
    const unit = await getUnitAlerts({ db: t.handle.db, viewer: operator, siteId: siteA, unitId: w1.id });
    expect(unit.map((a) => a.row.condition)).toEqual(['stator-temperature', 'overspeed', 'demagnetisation']);
  });

  it('counts open alerts per site, alarms among them', async () => {
    expect(await countOpenAlertsBySite({ db: t.handle.db, viewer: operator })).toEqual(
      [
        { siteId: siteA, open: 3, alarms: 1, shelved: 0 },
        { siteId: siteB, open: 1, alarms: 0, shelved: 0 },
      ].sort((a, b) => a.siteId.localeCompare(b.siteId)),
    );
    expect(await countOpenAlertsBySite({ db: t.handle.db, viewer: crewB })).toEqual([{ siteId: siteB, open: 1, alarms: 0, shelved: 0 }]);
  });
});

describe('the alert list screen', () => {
  it('builds each row in words: condition, reading and limit, state, stale mark, who may act', async () => {
    const screen = await readAlertsScreen({ db: t.handle.db, viewer: crewA, nowMs: now, search: {} });
    expect(screen.problem).toBeUndefined();
    const byId = new Map(screen.rows.map((r) => [Number(r.id), r]));
    const over = byId.get(ids.overspeed)!;
    expect(over).toMatchObject({ conditionName: 'Overspeed', severityName: 'Alarm', badge: 'fault', stateText: 'Active', unitHref: `/sites/${siteA}/units/${w1.id}` });
    expect(over.reading).toBe('431\u202frpm');
    expect(over.limit).toBe('420\u202frpm');
    expect(byId.get(ids.offlineCleared)!.stateText).toBe('Cleared, not acknowledged');
    expect(byId.get(ids.stale)!.stale).toBe(true);
    expect(over.stale).toBe(false);
    expect(over.mayAcknowledge && over.mayShelve && screen.canAct).toBe(true);
    const owner = await readAlertsScreen({ db: t.handle.db, viewer: ownerA, nowMs: now, search: {} });
    expect(owner.canAct).toBe(false);
    expect(owner.rows.every((r) => !r.mayAcknowledge && !r.mayShelve)).toBe(true);
  });

  it('filters by severity, condition, state and site, and names and drops a bad filter', async () => {
    const read = (search: Record<string, string>) => readAlertsScreen({ db: t.handle.db, viewer: operator, nowMs: now, search });
    expect((await read({ severity: 'alarm' })).rows.map((r) => Number(r.id))).toEqual([ids.overspeed]);
    expect((await read({ severity: 'alarm', state: 'all' })).rows.map((r) => Number(r.id))).toEqual([ids.hotTaken, ids.overspeed]);
    expect((await read({ condition: 'offline' })).rows.map((r) => Number(r.id))).toEqual([ids.offlineCleared]);
    expect((await read({ site: siteB })).rows.map((r) => Number(r.id))).toEqual([ids.bad]);
    expect((await read({ state: 'cleared' })).rows.map((r) => Number(r.id))).toEqual([ids.hotTaken, ids.offlineCleared]);
    const bad = await read({ severity: 'loud', site: siteB });
    expect(bad.problem).toMatch(/^severity: /);
    expect(bad.query.severity).toBeUndefined();
    expect(bad.query.site).toBe(siteB);
    expect(bad.rows.map((r) => Number(r.id))).toEqual([ids.bad]);
  });
});

describe("people's changes", () => {
  it('acknowledges several at once with a note, and refuses an alert of another site as not existing', async () => {
    const refused = await acknowledgeAlerts({ db: t.handle.db, viewer: crewA, nowMs: now, alertIds: [ids.overspeed, ids.bad], note: undefined });
    expect(refused).toEqual({ ok: false, error: `Alert ${ids.bad} does not exist. Nothing was acknowledged.` });
    expect((await getAlertById({ db: t.handle.db, viewer: operator, alertId: ids.overspeed }))!.row.acknowledgedAt).toBeNull();
    const done = await acknowledgeAlerts({ db: t.handle.db, viewer: crewA, nowMs: now, alertIds: [ids.overspeed, ids.offlineCleared, ids.hotTaken], note: 'Brake applied, going up.' });
    expect(done).toEqual({ ok: true, done: 'Acknowledged 2 alerts. One was acknowledged already.' });
    const screen = await readAlertsScreen({ db: t.handle.db, viewer: crewA, nowMs: now + 1000, search: {} });
    // The cleared one, once taken, leaves the crews' list.
    expect(screen.rows.map((r) => Number(r.id))).toEqual([ids.overspeed, ids.stale]);
    expect(screen.rows[0]).toMatchObject({ stateText: 'Acknowledged', acknowledgedBy: crewA.email, acknowledgeNote: 'Brake applied, going up.', mayAcknowledge: false });
    expect(await acknowledgeAlerts({ db: t.handle.db, viewer: ownerA, nowMs: now, alertIds: [ids.stale], note: undefined })).toMatchObject({ ok: false });
  });

  it('shelves with a reason and an end in the future, naming a missing reason or a past end', async () => {
    const shelve = (values: Record<string, string>, alertId = ids.stale, viewer = crewA) => shelveOneAlert({ db: t.handle.db, viewer, nowMs: now, alertId, values });
    expect(await shelve({ for: '8h' })).toMatchObject({ ok: false, fieldErrors: { reason: 'reason: say why the alert is shelved' } });
    expect(await shelve({ reason: 'Magnet survey booked', for: 'until', until: '2001-01-01T08:00' })).toMatchObject({ ok: false, fieldErrors: { until: 'until: must be in the future' } });
    expect(await shelve({ reason: 'x', for: 'forever' })).toMatchObject({ ok: false, fieldErrors: { for: 'for: choose how long to shelve it' } });
    expect(await shelve({ reason: 'x', for: '8h' }, ids.bad)).toEqual({ ok: false, error: `Alert ${ids.bad} does not exist.` });
    expect(await shelve({ reason: 'x', for: '8h' }, ids.offlineCleared)).toEqual({ ok: false, error: 'This alert has cleared: there is nothing to shelve.' });
    expect(await shelve({ reason: 'Magnet survey booked for Tuesday', for: '24h' })).toMatchObject({ ok: true });
    const row = (await getAlertById({ db: t.handle.db, viewer: crewA, alertId: ids.stale }))!.row;
    expect(row.state).toBe('shelved');
    expect(row.shelvedUntil!.getTime()).toBe(now + 24 * HOUR);
    expect(row.shelveReason).toBe('Magnet survey booked for Tuesday');
    const screen = await readAlertsScreen({ db: t.handle.db, viewer: crewA, nowMs: now + 1000, search: {} });
    expect(screen.shelved.map((r) => Number(r.id))).toEqual([ids.stale]);
    expect(screen.rows.map((r) => Number(r.id))).toEqual([ids.overspeed]);
  });

  it("shows one alert's history in order, with the caution and the links to its unit", async () => {
    const screen = (await readAlertScreen({ db: t.handle.db, viewer: crewA, nowMs: now + 2000, alertId: String(ids.hotTaken) }))!;
    expect(screen.history.map((e) => [e.what, e.state, e.by])).toEqual([
      ['Opened', 'Active', 'millrace'],
      ['Acknowledged', 'Acknowledged', 'someone@test.invalid'],
      ['Cleared', 'Cleared', 'millrace'],
    ]);
    expect(screen.caution).toBe(SAFETY_CAUTION);
    expect(screen.links.unit).toBe(`/sites/${siteA}/units/${w1.id}`);
    const over = (await readAlertScreen({ db: t.handle.db, viewer: crewA, nowMs: now + 2000, alertId: String(ids.overspeed) }))!;
    expect(over.history.map((e) => [e.what, e.note])).toEqual([
      ['Opened', null],
      ['Acknowledged', 'Brake applied, going up.'],
    ]);
    expect(await readAlertScreen({ db: t.handle.db, viewer: crewA, nowMs: now, alertId: 'x1' })).toBeUndefined();
  });
});

describe('GET /api/v1/alerts (contract sections 6 and 7)', () => {
  const call = async (viewer: Viewer, query: string) => {
    const response = await alertsAnswer({ db: t.handle.db, viewer, search: new URLSearchParams(query) });
    return { status: response.status, body: (await response.json()) as Record<string, unknown> };
  };

  it('answers { alerts: [alert, ...] } with exactly the alert object, newest first', async () => {
    const { status, body } = await call(operator, 'state=all');
    expect(status).toBe(200);
    expect(Object.keys(body)).toEqual(['alerts']);
    const alerts = body.alerts as Array<Record<string, unknown>>;
    expect(alerts.map((a) => a.id)).toEqual([ids.bad, ids.hotTaken, ids.offlineCleared, ids.overspeed, ids.stale].map(String));
    const keys = ['id', 'siteId', 'unitId', 'condition', 'severity', 'state', 'openedAt', 'changedAt', 'message', 'value', 'limit', 'acknowledgedAt', 'acknowledgedBy', 'clearedAt', 'shelvedUntil', 'url'];
    for (const a of alerts) expect(Object.keys(a).sort()).toEqual([...keys].sort());
    expect(alerts.find((a) => a.id === String(ids.overspeed))).toMatchObject({
      siteId: siteA,
      unitId: w1.id,
      condition: 'overspeed',
      severity: 'alarm',
      state: 'acknowledged',
      value: 431.4,
      limit: 420,
      acknowledgedBy: crewA.email,
      clearedAt: null,
      shelvedUntil: null,
      openedAt: new Date(now - 3 * HOUR).toISOString(),
      url: `/sites/${siteA}/units/${w1.id}`,
    });
  });

  it("defaults to the crews' list and keeps to the viewer's sites", async () => {
    const active = await call(crewA, '');
    expect((active.body.alerts as Array<{ id: string }>).map((a) => a.id)).toEqual([ids.overspeed, ids.stale].map(String));
    const b = await call(crewB, 'state=all');
    expect((b.body.alerts as Array<{ id: string }>).map((a) => a.id)).toEqual([String(ids.bad)]);
    const site = await call(operator, `state=all&site=${siteB}`);
    expect((site.body.alerts as Array<{ id: string }>).map((a) => a.id)).toEqual([String(ids.bad)]);
  });

  it('answers 400 naming a bad state or site, and 404 for a site the caller may not see', async () => {
    const state = await call(operator, 'state=open');
    expect(state.status).toBe(400);
    expect(state.body).toEqual({ error: { code: 'bad-parameter', message: 'state: must be active or all, got "open"' } });
    const site = await call(operator, 'site=No_Such');
    expect(site.status).toBe(400);
    expect(site.body).toMatchObject({ error: { code: 'bad-parameter', message: expect.stringMatching(/^site: /) } });
    const other = await call(crewB, `site=${siteA}`);
    const missing = await call(crewB, 'site=no-such-site');
    expect(other.status).toBe(404);
    expect(missing.status).toBe(404);
    expect(JSON.stringify(other.body).replace(siteA, 'S')).toBe(JSON.stringify(missing.body).replace('no-such-site', 'S'));
  });
});

describe('one unit’s alerts', () => {
  it('the list filters by unit within a site and keeps it in its links; the unit page shows that unit’s open alerts only', async () => {
    const list = await readAlertsScreen({ db: t.handle.db, viewer: operator, nowMs: now, search: { site: siteA, unit: w2.id, state: 'all' } });
    expect(list.rows.map((r) => Number(r.id))).toEqual([ids.offlineCleared]);
    expect(list.summary).toMatch(new RegExp(`^1 alert for unit ${w2.id} of site `));
    const unit = await readUnitScreen({ db: t.handle.db, viewer: crewA, siteId: siteA, unitId: w1.id, rangeParam: undefined, nowMs: now });
    // w1's overspeed and stale Ke warning are open; its stator alert was taken and cleared, so it has left the crews' list.
    expect(unit!.alerts.rows.map((r) => Number(r.id)).sort()).toEqual([ids.overspeed, ids.stale].sort());
    expect(unit!.alerts.allHref).toBe(`/alerts?site=${siteA}&unit=${w1.id}&state=all`);
    expect(await readUnitScreen({ db: t.handle.db, viewer: crewB, siteId: siteA, unitId: w1.id, rangeParam: undefined, nowMs: now })).toBeUndefined();
  });
});
