import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { LOCAL_VIEWER, type Viewer } from '@/lib/auth/viewer';
import type { LiveEvent } from '@/lib/live/events';
import { createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { queryRows, registerFleet, testFleet, testTag } from '@/test/support/ingest';
import { getDeviceCredentials, issueDeviceCredentials, listBrokerAccounts, listDeviceCredentials, revokeDeviceCredentials, verifyBrokerCredentials } from './queries';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 2, hydroUnits: 1 });
const [w1, w2, h1] = fleet.units as [(typeof fleet.units)[0], (typeof fleet.units)[0], (typeof fleet.units)[0]];
const windSite = w1.siteId;
const hydroSite = h1.siteId;
const operator: Viewer = { id: 'person:1', role: 'operator', siteIds: 'all' };
const crewOfHydro: Viewer = { id: 'person:2', role: 'crew', siteIds: [hydroSite] };
const ownerOfWind: Viewer = { id: 'person:3', role: 'owner', siteIds: [windSite] };

let db: TestDatabase;
const events: LiveEvent[] = [];
const live = { publish: (e: readonly LiveEvent[]) => void events.push(...e) };

beforeAll(async () => {
  db = await createTestDatabase();
  await registerFleet(db.handle, fleet);
});
afterAll(() => db?.drop());

describe('device credentials', () => {
  it('issues a readable username and a password that verifies, then rotates it: the old one stops working', async () => {
    const first = await issueDeviceCredentials({ db: db.handle.db, viewer: operator, siteId: windSite, unitId: w1.id, live });
    if (!first.ok) throw new Error(first.message);
    expect(first.username).toBe(`${windSite}.${w1.id}`);
    expect(first.rotated).toBe(false);
    expect(events).toEqual([]);
    expect(await verifyBrokerCredentials({ db: db.handle.db, username: first.username, password: first.password })).toEqual({
      kind: 'device',
      username: first.username,
      siteId: windSite,
      unitId: w1.id,
    });
    const second = await issueDeviceCredentials({ db: db.handle.db, viewer: operator, siteId: windSite, unitId: w1.id, live });
    if (!second.ok) throw new Error(second.message);
    expect(second.rotated).toBe(true);
    expect(second.password).not.toBe(first.password);
    expect(events).toEqual([{ type: 'device-credentials', siteId: windSite, unitId: w1.id }]);
    expect(await verifyBrokerCredentials({ db: db.handle.db, username: first.username, password: first.password })).toBeUndefined();
    expect(await verifyBrokerCredentials({ db: db.handle.db, username: first.username, password: second.password })).toBeDefined();
    // Both in the audit log, by whom and for which unit, without the password.
    const audit = await queryRows<{ action: string; target: string; detail: unknown }>(db.handle, `select action, target, detail from audit_log where target = $1 order by id`, [`unit ${windSite}/${w1.id}`]);
    expect(audit.map((a) => a.action)).toEqual(['device-credentials-issued', 'device-credentials-rotated']);
    expect(JSON.stringify(audit)).not.toContain(first.password);
    expect(JSON.stringify(audit)).not.toContain(second.password);
    // Stored as a $7$ hash, never as the password.
    const [row] = await listBrokerAccounts({ db: db.handle.db });
    expect(row?.passwordHash).toMatch(/^\$7\$101\$/);
    expect(row?.passwordHash).not.toContain(second.password);
  });

  it('answers a unit on a site the viewer may not see as not found, and a read-only viewer as not allowed; nothing changes', async () => {
    const before = await listDeviceCredentials({ db: db.handle.db, viewer: LOCAL_VIEWER });
    expect(await issueDeviceCredentials({ db: db.handle.db, viewer: crewOfHydro, siteId: windSite, unitId: w2.id })).toMatchObject({ ok: false, reason: 'not-found' });
    expect(await issueDeviceCredentials({ db: db.handle.db, viewer: crewOfHydro, siteId: hydroSite, unitId: h1.id })).toMatchObject({ ok: false, reason: 'not-allowed' });
    expect(await issueDeviceCredentials({ db: db.handle.db, viewer: ownerOfWind, siteId: windSite, unitId: w1.id })).toMatchObject({ ok: false, reason: 'not-allowed' });
    expect(await revokeDeviceCredentials({ db: db.handle.db, viewer: ownerOfWind, siteId: windSite, unitId: w1.id })).toMatchObject({ ok: false, reason: 'not-allowed' });
    // A unit of another site under this site's id, and a unit that does not exist.
    expect(await issueDeviceCredentials({ db: db.handle.db, viewer: operator, siteId: windSite, unitId: h1.id })).toMatchObject({ ok: false, reason: 'not-found' });
    expect(await issueDeviceCredentials({ db: db.handle.db, viewer: operator, siteId: windSite, unitId: 'no-such-unit' })).toMatchObject({ ok: false, reason: 'not-found' });
    expect(await listDeviceCredentials({ db: db.handle.db, viewer: LOCAL_VIEWER })).toEqual(before);
  });

  it('lists only the viewer\'s sites, and never a secret', async () => {
    await issueDeviceCredentials({ db: db.handle.db, viewer: operator, siteId: hydroSite, unitId: h1.id });
    const all = await listDeviceCredentials({ db: db.handle.db, viewer: operator });
    // By site, then unit: brindle-beck-… before karrow-fell-….
    expect(all.map((a) => a.unitId)).toEqual([h1.id, w1.id]);
    for (const a of all) expect(Object.keys(a).sort()).toEqual(['createdAt', 'revokedAt', 'rotatedAt', 'siteId', 'unitId', 'username']);
    expect((await listDeviceCredentials({ db: db.handle.db, viewer: crewOfHydro })).map((a) => a.unitId)).toEqual([h1.id]);
    expect(await listDeviceCredentials({ db: db.handle.db, viewer: { ...crewOfHydro, siteIds: [] } })).toEqual([]);
    expect(await getDeviceCredentials({ db: db.handle.db, viewer: crewOfHydro, siteId: windSite, unitId: w1.id })).toBeUndefined();
    expect(await getDeviceCredentials({ db: db.handle.db, viewer: ownerOfWind, siteId: windSite, unitId: w1.id })).toMatchObject({ username: `${windSite}.${w1.id}` });
  });

  it('revokes: refused, marked, left out of the export, cut off; issuing again brings it back', async () => {
    events.length = 0;
    const issued = await issueDeviceCredentials({ db: db.handle.db, viewer: operator, siteId: windSite, unitId: w2.id });
    if (!issued.ok) throw new Error(issued.message);
    expect(await revokeDeviceCredentials({ db: db.handle.db, viewer: operator, siteId: windSite, unitId: w2.id, live })).toEqual({ ok: true, revoked: true });
    expect(events).toEqual([{ type: 'device-credentials', siteId: windSite, unitId: w2.id }]);
    expect(await verifyBrokerCredentials({ db: db.handle.db, username: issued.username, password: issued.password })).toBeUndefined();
    expect((await getDeviceCredentials({ db: db.handle.db, viewer: operator, siteId: windSite, unitId: w2.id }))?.revokedAt).toBeInstanceOf(Date);
    expect((await listBrokerAccounts({ db: db.handle.db })).map((a) => a.username)).not.toContain(issued.username);
    const again = await issueDeviceCredentials({ db: db.handle.db, viewer: operator, siteId: windSite, unitId: w2.id });
    if (!again.ok) throw new Error(again.message);
    expect(await verifyBrokerCredentials({ db: db.handle.db, username: again.username, password: again.password })).toBeDefined();
    expect((await getDeviceCredentials({ db: db.handle.db, viewer: operator, siteId: windSite, unitId: w2.id }))?.revokedAt).toBeNull();
  });

  it('verifies nothing for an unknown username or an empty password', async () => {
    expect(await verifyBrokerCredentials({ db: db.handle.db, username: 'nobody.nothing', password: 'x' })).toBeUndefined();
    expect(await verifyBrokerCredentials({ db: db.handle.db, username: `${windSite}.${w1.id}`, password: '' })).toBeUndefined();
  });
});
