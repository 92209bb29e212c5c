/**
 * Who may do what on the embedded broker. Pure rules and a small cache; the
 * host (lib/server/product.ts) hands in how a username and password are
 * checked, so this folder never reads the database.
 *
 * - A device publishes only to its own `millrace/<site>/<unit>/telemetry`
 *   and `.../presence` (its last will too) and subscribes to nothing.
 * - An ingester subscribes to telemetry and presence of every unit (also
 *   through a `$share/<group>/` filter) and publishes nothing.
 * - Anyone without a valid username and password is refused at CONNECT.
 */
import { createHash, timingSafeEqual } from 'node:crypto';

export type BrokerIdentity =
  | { readonly kind: 'device'; readonly username: string; readonly siteId: string; readonly unitId: string }
  | { readonly kind: 'ingester'; readonly username: string };

/** What the host gives the broker: how to check a username and password. */
export interface BrokerAuthoriser {
  /** The identity behind these credentials, or undefined when they are not valid (unknown, wrong, revoked). */
  verify(username: string, password: Buffer): Promise<BrokerIdentity | undefined>;
}

/** The topics a device may publish to. */
export function deviceTopics(siteId: string, unitId: string): string[] {
  return [`millrace/${siteId}/${unitId}/telemetry`, `millrace/${siteId}/${unitId}/presence`];
}

/**
 * Whether `identity` may publish to `topic` (also its last will).
 * @example mayPublish({ kind: 'device', username: 's.u', siteId: 's', unitId: 'u' }, 'millrace/s/u/telemetry') // true
 */
export function mayPublish(identity: BrokerIdentity | undefined, topic: string): boolean {
  if (identity?.kind !== 'device') return false;
  return deviceTopics(identity.siteId, identity.unitId).includes(topic);
}

/** The filters an ingester may subscribe to (each also behind `$share/<group>/`). */
export const INGESTER_FILTERS: readonly string[] = ['millrace/+/+/telemetry', 'millrace/+/+/presence'];

/**
 * Whether `identity` may subscribe to `filter`. An ingester may take exactly
 * the telemetry and presence filters, plain or shared; nobody else anything.
 * @example maySubscribe({ kind: 'ingester', username: 'i' }, '$share/g/millrace/+/+/telemetry') // true
 */
export function maySubscribe(identity: BrokerIdentity | undefined, filter: string): boolean {
  if (identity?.kind !== 'ingester') return false;
  const shared = /^\$share\/[^/+#]+\/(.+)$/.exec(filter);
  return INGESTER_FILTERS.includes(shared ? shared[1]! : filter);
}

/** How long a verified username and password are taken without hashing again, ms. */
export const CREDENTIAL_CACHE_MS = 60_000;
/** Most entries the cache holds (the oldest go first). */
export const CREDENTIAL_CACHE_MAX = 10_000;

/**
 * Remembers verified credentials for a short while: a fleet reconnecting at
 * once (after a broker restart or a network outage) would otherwise run
 * PBKDF2 once per device. The password itself is not kept, only its SHA-256
 * (the passwords are 128-bit random secrets, so a fast hash does not weaken
 * them). `forget` drops a username at once (rotation, revocation).
 */
export function createCredentialCache({ ttlMs = CREDENTIAL_CACHE_MS, max = CREDENTIAL_CACHE_MAX, now = Date.now }: { ttlMs?: number; max?: number; now?: () => number } = {}) {
  const entries = new Map<string, { digest: Buffer; identity: BrokerIdentity; until: number }>();
  const digestOf = (password: Buffer) => createHash('sha256').update(password).digest();
  return {
    get(username: string, password: Buffer): BrokerIdentity | undefined {
      const e = entries.get(username);
      if (!e) return undefined;
      if (e.until <= now()) {
        entries.delete(username);
        return undefined;
      }
      return timingSafeEqual(e.digest, digestOf(password)) ? e.identity : undefined;
    },
    set(username: string, password: Buffer, identity: BrokerIdentity): void {
      entries.delete(username);
      if (entries.size >= max) entries.delete(entries.keys().next().value!);
      entries.set(username, { digest: digestOf(password), identity, until: now() + ttlMs });
    },
    forget(username: string): void {
      entries.delete(username);
    },
    /** Drops every entry of a unit's device (its username may not be known to the caller). */
    forgetUnit(siteId: string, unitId: string): void {
      for (const [username, e] of entries) {
        if (e.identity.kind === 'device' && e.identity.siteId === siteId && e.identity.unitId === unitId) entries.delete(username);
      }
    },
    size: () => entries.size,
  };
}

export type CredentialCache = ReturnType<typeof createCredentialCache>;
