'use server';
/**
 * People's changes to alerts, made with action() (lib/request/action.ts):
 * crews, operators and admins acknowledge and shelve alerts of the sites they
 * see; owners are refused. An alert of another site answers like one that
 * does not exist.
 */
import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import { canAcknowledge } from '@/lib/auth/viewer';
import { acknowledgeAlerts, shelveOneAlert } from '@/lib/alerts/changes';
import { acknowledgeFromForm } from '@/lib/alerts/forms';
import { action, type ActionState } from '@/lib/request/action';

const REFUSED = 'Your role may not change alerts: owners see them only.';

/** Acknowledges the alerts ticked (`alertId`, one or more), with an optional note. */
export const acknowledgeAlertsAction = action(
  { allow: canAcknowledge, refused: REFUSED, input: (_values, _bound, data) => acknowledgeFromForm(data) },
  async ({ db, viewer, nowMs, input, values, submitted }): Promise<ActionState> => {
    const outcome = await acknowledgeAlerts({ db, viewer, nowMs, ...input });
    if (!outcome.ok) return { submitted, values, error: outcome.error };
    revalidatePath('/alerts', 'layout');
    return { submitted, done: outcome.done };
  },
);

/** Shelves one alert (bound id) with a reason, for a span or until a time. */
export const shelveAlertAction = action(
  { allow: canAcknowledge, refused: REFUSED, bound: z.tuple([z.number().int().positive()]), badBound: 'That alert does not exist.' },
  async ({ db, viewer, nowMs, bound: [alertId], values, submitted }): Promise<ActionState> => {
    const outcome = await shelveOneAlert({ db, viewer, nowMs, alertId, values });
    if (!outcome.ok) return { submitted, values, error: outcome.error, fieldErrors: outcome.fieldErrors };
    revalidatePath('/alerts', 'layout');
    return { submitted, done: outcome.done };
  },
);
