/**
 * The embedded broker's authoriser, built by the host from the database:
 * devices and a stored ingesters' account through `verifyBrokerCredentials`,
 * plus the in-process ingester's account, which lives only in memory for the
 * life of the process (a new random password at each start).
 */
import { timingSafeEqual, createHash } from 'node:crypto';
import type { Db } from '@/db/client';
import type { BrokerAuthoriser } from '@/lib/broker/access';
import { newPassword } from './credentials';
import { verifyBrokerCredentials } from './queries';

/** Username of the in-process ingester on the embedded broker (no dot, so never a device's). */
export const LOCAL_INGESTER_USERNAME = 'millrace-ingest-local';

/** A new in-memory account for the ingester that runs in this process. */
export function newLocalIngesterAccount(): { username: string; password: string } {
  return { username: LOCAL_INGESTER_USERNAME, password: newPassword() };
}

const digest = (value: string | Buffer) => createHash('sha256').update(value).digest();

/** Checks credentials against the database, and the local ingester's in-memory account first. */
export function createBrokerAuthoriser({ db, localIngester }: { db: Db; localIngester?: { username: string; password: string } }): BrokerAuthoriser {
  const local = localIngester && { username: localIngester.username, digest: digest(localIngester.password) };
  return {
    async verify(username, password) {
      if (local && username === local.username) {
        return timingSafeEqual(digest(password), local.digest) ? { kind: 'ingester', username } : undefined;
      }
      return verifyBrokerCredentials({ db, username, password });
    },
  };
}

/**
 * Cuts a unit's device off the embedded broker as soon as its credentials
 * change: the live feed carries `device-credentials` events from the rotate
 * and revoke paths (in this process, or NOTIFY from a command on PostgreSQL).
 * Returns the unsubscribe function.
 */
export function cutOffOnCredentialChange(
  hub: { subscribe(listener: (stamped: { event: { type: string; siteId: string; unitId: string } }) => void): () => void },
  broker: { disconnectUnit(siteId: string, unitId: string): number },
): () => void {
  return hub.subscribe(({ event }) => {
    if (event.type === 'device-credentials') broker.disconnectUnit(event.siteId, event.unitId);
  });
}
