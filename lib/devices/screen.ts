/**
 * The device-credentials section of a unit's setup page: issue, rotate or
 * revoke the unit's MQTT account, announced on the live feed (the embedded
 * broker cuts the device off), with the outcome in words.
 */
import type { DatabaseHandle } from '@/db/client';
import type { Viewer } from '@/lib/auth/viewer';
import { issueDeviceCredentials, revokeDeviceCredentials } from '@/lib/devices/queries';
import { createLivePublisher } from '@/lib/live/publisher';

export type CredentialsChange =
  | { ok: true; issued?: { username: string; password: string; rotated: boolean } }
  | { ok: false; problem: string };

/** Issues (or rotates) or revokes a unit's account for the viewer; not found and not allowed come back as words. */
export async function changeDeviceCredentials({
  handle,
  viewer,
  siteId,
  unitId,
  intent,
}: {
  handle: DatabaseHandle;
  viewer: Viewer;
  siteId: string;
  unitId: string;
  intent: 'issue' | 'revoke';
}): Promise<CredentialsChange> {
  const live = createLivePublisher({ handle });
  const args = { db: handle.db, viewer, siteId, unitId, live };
  const result = intent === 'revoke' ? await revokeDeviceCredentials(args) : await issueDeviceCredentials(args);
  await live.flush();
  if (!result.ok) return { ok: false, problem: result.reason === 'not-found' ? 'That unit does not exist (or is not yours to see).' : result.message };
  return 'password' in result ? { ok: true, issued: { username: result.username, password: result.password, rotated: result.rotated } } : { ok: true };
}
