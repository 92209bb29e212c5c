/**
 * What a person does to alerts: acknowledge some (with a note), shelve one
 * (with a reason and an end). Each goes through the lifecycle's step under
 * the row's lock (store.ts), so the change, its event and its webhook
 * messages are one transaction; each is written to the audit log. Only
 * alerts of the viewer's sites: another's answers like one that does not exist.
 */
import type { Db } from '@/db/client';
import { actorOfViewer, auditAcknowledgement, writeAudit } from '@/lib/auth/audit';
import { canAcknowledge, type Viewer } from '@/lib/auth/viewer';
import { formatSiteTime } from '@/lib/text/format';
import { shelveFromForm, type AcknowledgeInput } from './forms';
import { acknowledgeAlert, shelveAlert } from './lifecycle';
import { getAlertById, getVisibleAlertIds } from './queries';
import { updateAlert, type ChangeActor } from './store';

/** The outcome of a person's change: words for what was done, or the problem. */
export type ChangeOutcome = { ok: true; done: string } | { ok: false; error: string; fieldErrors?: Record<string, string> };

const REFUSED = 'Your role may not change alerts: owners see them only.';
const GONE = (id: number) => `Alert ${id} does not exist.`;

function actorOf(viewer: Viewer, note: string | undefined): ChangeActor {
  const who = actorOfViewer(viewer);
  return { label: who.label, ...(viewer.personId !== undefined ? { personId: viewer.personId } : {}), ...(note !== undefined ? { note } : {}) };
}

/**
 * Acknowledges each alert (all of the viewer's sites, or none is changed); one already taken
 * stays as it was and is counted apart.
 */
export async function acknowledgeAlerts({ db, viewer, nowMs, alertIds, note }: AcknowledgeInput & { db: Db; viewer: Viewer; nowMs: number }): Promise<ChangeOutcome> {
  if (!canAcknowledge(viewer)) return { ok: false, error: REFUSED };
  const visible = await getVisibleAlertIds({ db, viewer, alertIds });
  const missing = alertIds.find((id) => !visible.has(id));
  if (missing !== undefined) return { ok: false, error: `${GONE(missing)} Nothing was acknowledged.` };
  let taken = 0;
  let already = 0;
  for (const alertId of alertIds) {
    const result = await updateAlert({ db, alertId, next: (life) => acknowledgeAlert(life, nowMs), actor: actorOf(viewer, note), nowMs });
    if (result && result.changes.length > 0) {
      taken++;
      await auditAcknowledgement({ db, viewer, alertId, ...(note !== undefined ? { note } : {}) });
    } else already++;
  }
  const words = [taken > 0 ? `Acknowledged ${taken === 1 ? 'one alert' : `${taken} alerts`}.` : '', already > 0 ? `${already === 1 ? 'One was' : `${already} were`} acknowledged already.` : ''];
  return { ok: true, done: words.filter(Boolean).join(' ') };
}

/**
 * Shelves one alert from the shelve form's values (reason, for, until on the site's clock).
 * A cleared alert cannot be shelved: it says so.
 */
export async function shelveOneAlert({
  db,
  viewer,
  nowMs,
  alertId,
  values,
}: {
  db: Db;
  viewer: Viewer;
  nowMs: number;
  alertId: number;
  values: Record<string, string>;
}): Promise<ChangeOutcome> {
  if (!canAcknowledge(viewer)) return { ok: false, error: REFUSED };
  const found = await getAlertById({ db, viewer, alertId });
  if (!found) return { ok: false, error: GONE(alertId) };
  const form = shelveFromForm(values, { nowMs, timeZone: found.timezone });
  if (!form.ok) return { ok: false, error: 'Not shelved: correct the fields named.', fieldErrors: form.fieldErrors };
  const { reason, untilMs } = form.value;
  const result = await updateAlert({ db, alertId, next: (life) => shelveAlert(life, untilMs, nowMs), actor: actorOf(viewer, reason), nowMs });
  if (!result) return { ok: false, error: GONE(alertId) };
  if (result.changes.length === 0) return { ok: false, error: 'This alert has cleared: there is nothing to shelve.' };
  await writeAudit({ db, actor: actorOfViewer(viewer), action: 'alert-shelved', target: `alert ${alertId}`, detail: { reason, until: new Date(untilMs).toISOString() } });
  return { ok: true, done: `Shelved until ${formatSiteTime(new Date(untilMs), found.timezone, new Date(nowMs))} (site time).` };
}
