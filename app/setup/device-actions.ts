'use server';
/**
 * The setup screen's device-credential write: issue a unit's MQTT account or
 * rotate its password. POST only (a server action); the new password is in
 * this one answer and nowhere else (only its hash is stored). Rotation is
 * announced on the live feed, so the embedded broker cuts the device off.
 */
import { revalidatePath } from 'next/cache';
import { getDatabase } from '@/db/client';
import { currentViewer } from '@/lib/auth/viewer';
import { SLUG } from '@/lib/contract/nameplate';
import { issueDeviceCredentials, revokeDeviceCredentials } from '@/lib/devices/queries';
import { createLivePublisher } from '@/lib/live/publisher';

export interface DeviceCredentialsState {
  submitted: number;
  issued?: { username: string; password: string; rotated: boolean };
  revoked?: boolean;
  problem?: string;
}

export async function issueDeviceCredentialsAction(
  ids: { siteId: string; unitId: string },
  previous: DeviceCredentialsState,
): Promise<DeviceCredentialsState> {
  const submitted = previous.submitted + 1;
  // Bound arguments come from our own page, but a posted action can carry anything.
  if (!SLUG.test(ids.siteId) || !SLUG.test(ids.unitId)) return { submitted, problem: 'That unit does not exist.' };
  const handle = await getDatabase();
  const viewer = await currentViewer();
  const live = createLivePublisher({ handle });
  const result = await issueDeviceCredentials({ db: handle.db, viewer, siteId: ids.siteId, unitId: ids.unitId, live });
  await live.flush();
  if (!result.ok) {
    return { submitted, problem: result.reason === 'not-found' ? 'That unit does not exist (or is not yours to see).' : result.message };
  }
  revalidatePath(`/setup/units/${ids.siteId}/${ids.unitId}`);
  return { submitted, issued: { username: result.username, password: result.password, rotated: result.rotated } };
}

/**
 * The section's one form action: `intent` "revoke" revokes the unit's account
 * (a lost or stolen device: it can no longer connect, and a connected device
 * is cut off); anything else issues or rotates.
 */
export async function deviceCredentialsAction(
  ids: { siteId: string; unitId: string },
  previous: DeviceCredentialsState,
  data: FormData,
): Promise<DeviceCredentialsState> {
  if (data.get('intent') !== 'revoke') return issueDeviceCredentialsAction(ids, previous);
  const submitted = previous.submitted + 1;
  if (!SLUG.test(ids.siteId) || !SLUG.test(ids.unitId)) return { submitted, problem: 'That unit does not exist.' };
  const handle = await getDatabase();
  const viewer = await currentViewer();
  const live = createLivePublisher({ handle });
  const result = await revokeDeviceCredentials({ db: handle.db, viewer, siteId: ids.siteId, unitId: ids.unitId, live });
  await live.flush();
  if (!result.ok) {
    return { submitted, problem: result.reason === 'not-found' ? 'That unit does not exist (or is not yours to see).' : result.message };
  }
  revalidatePath(`/setup/units/${ids.siteId}/${ids.unitId}`);
  return { submitted, revoked: true };
}
