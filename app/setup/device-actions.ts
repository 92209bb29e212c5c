'use server';
/**
 * The setup screen's device-credential write: issue a unit's MQTT account,
 * rotate its password, or revoke it. POST only (a server action, made with
 * action()); the new password is in this one answer and nowhere else (only
 * its hash is stored). A change is announced on the live feed, so the
 * embedded broker cuts the device off.
 */
import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import { canEditSetup } from '@/lib/auth/viewer';
import { SLUG } from '@/lib/contract/nameplate';
import { changeDeviceCredentials } from '@/lib/devices/screen';
import { action, type ActionContext, type ActionState } from '@/lib/request/action';

export interface DeviceCredentialsState extends ActionState {
  issued?: { username: string; password: string; rotated: boolean };
  revoked?: boolean;
}

type UnitIds = { siteId: string; unitId: string };

const OPTIONS = {
  allow: canEditSetup,
  refused: 'You may not change device credentials: ask an administrator or operator.',
  bound: z.tuple([z.object({ siteId: z.string().regex(SLUG), unitId: z.string().regex(SLUG) })]),
  badBound: 'That unit does not exist.',
};

async function change(
  { handle, viewer, bound: [ids], submitted }: Pick<ActionContext<unknown, [UnitIds]>, 'handle' | 'viewer' | 'bound' | 'submitted'>,
  intent: 'issue' | 'revoke',
): Promise<DeviceCredentialsState> {
  const result = await changeDeviceCredentials({ handle, viewer, ...ids, intent });
  if (!result.ok) return { submitted, error: result.problem };
  revalidatePath(`/setup/units/${ids.siteId}/${ids.unitId}`);
  return result.issued ? { submitted, issued: result.issued } : { submitted, revoked: true };
}

/** Issues the unit's account, or rotates its password. */
export const issueDeviceCredentialsAction = action(OPTIONS, (context): Promise<DeviceCredentialsState> => change(context, 'issue'));

/**
 * The section's one form action: `intent` "revoke" revokes the unit's account
 * (a lost or stolen device: it can no longer connect, and a connected device
 * is cut off); anything else issues or rotates.
 */
export const deviceCredentialsAction = action(
  { ...OPTIONS, input: z.object({ intent: z.string().optional() }) },
  (context): Promise<DeviceCredentialsState> => change(context, context.input.intent === 'revoke' ? 'revoke' : 'issue'),
);
