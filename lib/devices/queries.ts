/**
 * MQTT accounts of units (devices): issue or rotate, revoke, list, and the
 * broker's check of a username and password. (The ingesters' account is not
 * kept here: the export takes it from MQTT_USERNAME / MQTT_PASSWORD, and the
 * embedded broker gives its in-process ingester an account in memory.)
 *
 * Screen-facing functions take the viewer: reads are scoped to the viewer's
 * sites, changes need `canEditSetup(viewer)`, and a unit on a site the viewer
 * may not see is reported as not found. The broker's check and the export
 * for Mosquitto take only the database (they run for the broker, not for a
 * person). A password is returned once, when it is issued; only its hash is
 * stored (credentials.ts).
 *
 * Rotation and revocation publish `{ type: 'device-credentials', siteId,
 * unitId }` on the live feed when given a publisher: the embedded broker
 * hears it and disconnects that unit's device at once.
 */
import { and, asc, eq, inArray, isNull, sql } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { mqttAccounts, units } from '@/db/schema';
import { actorOfViewer, writeAudit } from '@/lib/auth/audit';
import { canEditSetup, canSeeSite, siteFilter, type Viewer } from '@/lib/auth/viewer';
import type { BrokerIdentity } from '@/lib/broker/access';
import type { LivePublisher } from '@/lib/live/publisher';
import { deviceUsername, hashPassword, newPassword, verifyPassword } from './credentials';

/** What the setup screen shows of a unit's account: never the password or its hash. */
export interface DeviceAccountInfo {
  siteId: string;
  unitId: string;
  username: string;
  createdAt: Date;
  rotatedAt: Date;
  revokedAt: Date | null;
}

export type IssueResult =
  | { ok: true; username: string; password: string; rotated: boolean }
  | { ok: false; reason: 'not-allowed' | 'not-found'; message: string };

type Live = Pick<LivePublisher, 'publish'> | undefined;

const NOT_FOUND = (siteId: string, unitId: string) =>
  ({ ok: false, reason: 'not-found', message: `no unit ${siteId}/${unitId}` }) as const;
const NOT_ALLOWED = { ok: false, reason: 'not-allowed', message: 'You may not change device credentials: ask an administrator or operator.' } as const;

async function unitKeyOf(db: Db, siteId: string, unitId: string): Promise<number | undefined> {
  const [row] = await db
    .select({ key: units.key })
    .from(units)
    .where(and(eq(units.id, unitId), eq(units.siteId, siteId)));
  return row?.key;
}

/**
 * Issues a unit's MQTT username and a new password, or rotates the password
 * of one it has (a revoked account comes back with the new password). The
 * password is in the result and nowhere else.
 */
export async function issueDeviceCredentials({
  db,
  viewer,
  siteId,
  unitId,
  live,
  audit = true,
}: {
  db: Db;
  viewer: Viewer;
  siteId: string;
  unitId: string;
  live?: Live;
  /** Write the audit log (who issued or rotated); off only for the demo fleet's own accounts at start. */
  audit?: boolean;
}): Promise<IssueResult> {
  if (!canSeeSite(viewer, siteId)) return NOT_FOUND(siteId, unitId);
  const unitKey = await unitKeyOf(db, siteId, unitId);
  if (unitKey === undefined) return NOT_FOUND(siteId, unitId);
  if (!canEditSetup(viewer)) return NOT_ALLOWED;
  const username = deviceUsername(siteId, unitId);
  const password = newPassword();
  const passwordHash = hashPassword(password);
  const [row] = await db
    .insert(mqttAccounts)
    .values({ username, role: 'device', unitKey, passwordHash })
    .onConflictDoUpdate({
      target: mqttAccounts.username,
      set: { passwordHash, rotatedAt: sql`now()`, revokedAt: null },
    })
    .returning({ createdAt: mqttAccounts.createdAt, rotatedAt: mqttAccounts.rotatedAt });
  const rotated = row !== undefined && row.rotatedAt.getTime() !== row.createdAt.getTime();
  if (audit) {
    await writeAudit({ db, actor: actorOfViewer(viewer), action: rotated ? 'device-credentials-rotated' : 'device-credentials-issued', target: `unit ${siteId}/${unitId}`, detail: { username } });
  }
  // A device still connected with the old password is cut off (embedded broker).
  if (rotated) live?.publish([{ type: 'device-credentials', siteId, unitId }]);
  return { ok: true, username, password, rotated };
}

/** Revokes a unit's account: it no longer connects, its device is disconnected, and the export leaves it out. */
export async function revokeDeviceCredentials({
  db,
  viewer,
  siteId,
  unitId,
  live,
}: {
  db: Db;
  viewer: Viewer;
  siteId: string;
  unitId: string;
  live?: Live;
}): Promise<{ ok: true; revoked: boolean } | { ok: false; reason: 'not-allowed' | 'not-found'; message: string }> {
  if (!canSeeSite(viewer, siteId)) return NOT_FOUND(siteId, unitId);
  const unitKey = await unitKeyOf(db, siteId, unitId);
  if (unitKey === undefined) return NOT_FOUND(siteId, unitId);
  if (!canEditSetup(viewer)) return NOT_ALLOWED;
  const rows = await db
    .update(mqttAccounts)
    .set({ revokedAt: sql`now()` })
    .where(and(eq(mqttAccounts.unitKey, unitKey), isNull(mqttAccounts.revokedAt)))
    .returning({ username: mqttAccounts.username });
  if (rows.length > 0) {
    await writeAudit({ db, actor: actorOfViewer(viewer), action: 'device-credentials-revoked', target: `unit ${siteId}/${unitId}`, detail: { username: rows[0]!.username } });
  }
  live?.publish([{ type: 'device-credentials', siteId, unitId }]);
  return { ok: true, revoked: rows.length > 0 };
}

/** The accounts of the units the viewer may see (optionally of one site), by site and unit; no secrets. */
export async function listDeviceCredentials({ db, viewer, siteId }: { db: Db; viewer: Viewer; siteId?: string }): Promise<DeviceAccountInfo[]> {
  const only = siteFilter(viewer);
  if (only !== undefined && only.length === 0) return [];
  if (siteId !== undefined && !canSeeSite(viewer, siteId)) return [];
  const rows = await db
    .select({
      siteId: units.siteId,
      unitId: units.id,
      username: mqttAccounts.username,
      createdAt: mqttAccounts.createdAt,
      rotatedAt: mqttAccounts.rotatedAt,
      revokedAt: mqttAccounts.revokedAt,
    })
    .from(mqttAccounts)
    .innerJoin(units, eq(units.key, mqttAccounts.unitKey))
    .where(
      and(
        only === undefined ? undefined : inArray(units.siteId, [...only]),
        siteId === undefined ? undefined : eq(units.siteId, siteId),
      ),
    )
    .orderBy(asc(units.siteId), asc(units.id));
  return rows;
}

/** One unit's account as the setup screen shows it; undefined when it has none or the viewer may not see the unit. */
export async function getDeviceCredentials({ db, viewer, siteId, unitId }: { db: Db; viewer: Viewer; siteId: string; unitId: string }): Promise<DeviceAccountInfo | undefined> {
  const rows = await listDeviceCredentials({ db, viewer, siteId });
  return rows.find((r) => r.unitId === unitId);
}

/**
 * The broker's check: the identity behind a username and password, or
 * undefined when the username is unknown, the password wrong, or the
 * account revoked.
 */
export async function verifyBrokerCredentials({ db, username, password }: { db: Db; username: string; password: string | Buffer }): Promise<BrokerIdentity | undefined> {
  const [row] = await db
    .select({ role: mqttAccounts.role, passwordHash: mqttAccounts.passwordHash, siteId: units.siteId, unitId: units.id })
    .from(mqttAccounts)
    .leftJoin(units, eq(units.key, mqttAccounts.unitKey))
    .where(and(eq(mqttAccounts.username, username), isNull(mqttAccounts.revokedAt)));
  if (!row || !(await verifyPassword(password, row.passwordHash))) return undefined;
  if (row.role === 'ingester') return { kind: 'ingester', username };
  if (row.siteId === null || row.unitId === null) return undefined;
  return { kind: 'device', username, siteId: row.siteId, unitId: row.unitId };
}

/** A live account with its stored hash, for Mosquitto's password and ACL files. */
export type BrokerAccount =
  | { role: 'device'; username: string; passwordHash: string; siteId: string; unitId: string }
  | { role: 'ingester'; username: string; passwordHash: string };

/** Every account not revoked, by username (the export's order, so files diff cleanly). */
export async function listBrokerAccounts({ db }: { db: Db }): Promise<BrokerAccount[]> {
  const rows = await db
    .select({ role: mqttAccounts.role, username: mqttAccounts.username, passwordHash: mqttAccounts.passwordHash, siteId: units.siteId, unitId: units.id })
    .from(mqttAccounts)
    .leftJoin(units, eq(units.key, mqttAccounts.unitKey))
    .where(isNull(mqttAccounts.revokedAt))
    .orderBy(asc(mqttAccounts.username));
  return rows.flatMap((r): BrokerAccount[] => {
    if (r.role === 'ingester') return [{ role: 'ingester', username: r.username, passwordHash: r.passwordHash }];
    return r.siteId !== null && r.unitId !== null ? [{ role: 'device', username: r.username, passwordHash: r.passwordHash, siteId: r.siteId, unitId: r.unitId }] : [];
  });
}
