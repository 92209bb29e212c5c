'use server';
/**
 * The webhooks page's writes, made with action(): admins and operators only.
 * Adding answers with the new endpoint's secret, in this one answer and
 * nowhere else; disabling gives up what the endpoint had not received. The
 * queries write the audit log.
 */
import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import { canEditSetup } from '@/lib/auth/viewer';
import { action, type ActionState } from '@/lib/request/action';
import { addWebhookEndpoint, disableWebhookEndpointFor, type AddedWebhookEndpoint } from '@/lib/setup/webhooks-screen';

const REFUSED = 'You may not change the setup: ask an administrator or operator.';
const GONE = 'That endpoint does not exist.';

/** The add form after a submission: the new endpoint and its secret, once. */
export interface AddWebhookState extends ActionState {
  added?: AddedWebhookEndpoint;
}

const endpointForm = z.object({
  url: z.string().max(4000, { error: 'must be at most 2,000 characters' }).default(''),
  siteId: z.string().max(200, { error: 'must be a site id (1 to 64 of a-z, 0-9 and -)' }).default(''),
  minSeverity: z.string().max(40, { error: 'must be info, warning or alarm' }).default('warning'),
});

/** Adds an endpoint: address, its site or every site (empty), lowest severity. */
export const addWebhookEndpointAction = action(
  { allow: canEditSetup, refused: REFUSED, input: endpointForm },
  async ({ db, viewer, input, values, submitted }): Promise<AddWebhookState> => {
    const result = await addWebhookEndpoint({ db, viewer, form: input });
    if (!result.ok) return { submitted, values, fieldErrors: result.fieldErrors };
    revalidatePath('/setup/webhooks');
    return { submitted, added: result.added, done: `Endpoint ${result.added.id} added.` };
  },
);

/** Disables one endpoint (bound: its id). */
export const disableWebhookEndpointAction = action(
  { allow: canEditSetup, refused: REFUSED, bound: z.tuple([z.number().int().positive().max(Number.MAX_SAFE_INTEGER)]), badBound: GONE },
  async ({ db, viewer, nowMs, bound: [id], submitted }): Promise<ActionState> => {
    const done = await disableWebhookEndpointFor({ db, viewer, id, nowMs });
    if (done === undefined) return { submitted, error: GONE };
    revalidatePath('/setup/webhooks');
    return { submitted, done };
  },
);
