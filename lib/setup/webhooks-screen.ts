/**
 * The setup screen's webhook endpoints (contract section 7): the list with
 * what each queue holds, adding one (its secret in that one answer) and
 * disabling one. Only a viewer who may change the setup sees any of it: an
 * endpoint's address may carry a key, and its secret signs every message.
 */
import type { Db } from '@/db/client';
import {
  disableWebhookEndpoint,
  insertWebhookEndpoint,
  listWebhookEndpoints,
  type WebhookEndpointSummary,
  type WebhookEndpointView,
} from '@/lib/alerts/webhooks/queries';
import { actorOfViewer } from '@/lib/auth/audit';
import { canEditSetup, type Viewer } from '@/lib/auth/viewer';
import { AppError } from '@/lib/errors/app-error';
import { requestContext } from '@/lib/request/context';
import { getSetupSites } from '@/lib/setup/queries';
import { formatUtc } from '@/lib/text/format';

/** The lowest severity an endpoint receives, in the words of the form and the list. */
export const SEVERITY_CHOICES: ReadonlyArray<{ value: string; label: string }> = [
  { value: 'alarm', label: 'Alarms only' },
  { value: 'warning', label: 'Warnings and alarms' },
  { value: 'info', label: 'Everything: information, warnings and alarms' },
];

/** One endpoint as the list shows it: every fact in words, never its secret. */
export interface WebhookEndpointRow {
  readonly id: number;
  /** The address the messages are posted to. */
  readonly url: string;
  readonly siteId: string | null;
  /** The site's name, or "Every site". */
  readonly siteLabel: string;
  readonly minSeverity: string;
  /** Such as "Warnings and alarms". */
  readonly severityLabel: string;
  readonly enabled: boolean;
  /** "Enabled" or "Disabled". */
  readonly stateLabel: string;
  readonly queued: number;
  readonly delivered: number;
  readonly givenUp: number;
  /** The counts in words: "2 queued", "14 delivered", "0 given up". */
  readonly countLabels: { readonly queued: string; readonly delivered: string; readonly givenUp: string };
  /** ISO-8601. */
  readonly createdAt: string;
  /** Such as "2026-12-02 14:05:09 UTC". */
  readonly createdAtLabel: string;
  readonly createdBy: string;
}

/** The webhooks page: for an editor the endpoints and the site choices; for anyone else nothing but that. */
export type WebhooksScreen =
  | { readonly editable: false }
  | {
      readonly editable: true;
      readonly endpoints: WebhookEndpointRow[];
      /** The sites an endpoint may be limited to (empty value: every site). */
      readonly siteChoices: ReadonlyArray<{ value: string; label: string }>;
      readonly severityChoices: ReadonlyArray<{ value: string; label: string }>;
      /** The form's starting severity (the command line's default). */
      readonly defaultSeverity: string;
    };

export async function loadWebhooksScreen(): Promise<WebhooksScreen> {
  const { db, viewer } = await requestContext();
  return readWebhooksScreen({ db, viewer });
}

export async function readWebhooksScreen({ db, viewer }: { db: Db; viewer: Viewer }): Promise<WebhooksScreen> {
  if (!canEditSetup(viewer)) return { editable: false };
  const [endpoints, sites] = await Promise.all([listWebhookEndpoints({ db }), getSetupSites({ db, viewer })]);
  const names = new Map(sites.map((s) => [s.id, s.name]));
  return {
    editable: true,
    endpoints: endpoints.map((e) => webhookEndpointRow(e, names)),
    siteChoices: [{ value: '', label: 'Every site' }, ...sites.map((s) => ({ value: s.id, label: `${s.name} (${s.id})` }))],
    severityChoices: SEVERITY_CHOICES,
    defaultSeverity: 'warning',
  };
}

const count = (n: number, what: string) => `${n.toLocaleString('en-GB')} ${what}`;

/** An endpoint in the list's words; `siteNames` by site id (an id without a name is shown as itself). */
export function webhookEndpointRow(e: WebhookEndpointSummary, siteNames: ReadonlyMap<string, string>): WebhookEndpointRow {
  return {
    id: e.id,
    url: e.url,
    siteId: e.siteId,
    siteLabel: e.siteId === null ? 'Every site' : (siteNames.get(e.siteId) ?? e.siteId),
    minSeverity: e.minSeverity,
    severityLabel: SEVERITY_CHOICES.find((c) => c.value === e.minSeverity)?.label ?? e.minSeverity,
    enabled: e.enabled,
    stateLabel: e.enabled ? 'Enabled' : 'Disabled',
    queued: e.pending,
    delivered: e.delivered,
    givenUp: e.givenUp,
    countLabels: { queued: count(e.pending, 'queued'), delivered: count(e.delivered, 'delivered'), givenUp: count(e.givenUp, 'given up') },
    createdAt: e.createdAt.toISOString(),
    createdAtLabel: formatUtc(e.createdAt),
    createdBy: e.createdBy,
  };
}

function mayManage(viewer: Viewer): void {
  // The action checks first; this keeps the rule with the write for any other caller.
  if (!canEditSetup(viewer)) throw new AppError('forbidden', 'setup', 'Only an administrator or operator may manage webhook endpoints.', { expose: true });
}

/** A new endpoint and its secret: the one time the secret leaves the database. */
export interface AddedWebhookEndpoint {
  readonly id: number;
  readonly url: string;
  /** Such as "Warnings and alarms of every site". */
  readonly reach: string;
  readonly secret: string;
}

function reachOf(e: WebhookEndpointView, siteNames: ReadonlyMap<string, string>): string {
  const row = webhookEndpointRow({ ...e, pending: 0, delivered: 0, givenUp: 0 }, siteNames);
  return `${row.severityLabel} of ${e.siteId === null ? 'every site' : row.siteLabel}`;
}

/**
 * Adds an endpoint for the viewer (an editor), recorded as added by them.
 * The form's site is a site id, or empty for every site. Problems come back
 * by form field (url, siteId, minSeverity).
 */
export async function addWebhookEndpoint({
  db,
  viewer,
  form,
}: {
  db: Db;
  viewer: Viewer;
  form: { url: string; siteId: string; minSeverity: string };
}): Promise<{ ok: true; added: AddedWebhookEndpoint } | { ok: false; fieldErrors: Record<string, string> }> {
  mayManage(viewer);
  const siteId = form.siteId.trim() === '' ? null : form.siteId;
  const result = await insertWebhookEndpoint({ db, url: form.url, siteId, minSeverity: form.minSeverity, createdBy: actorOfViewer(viewer).label });
  if (!result.ok) {
    const { createdBy, ...byField } = result.fieldErrors;
    return { ok: false, fieldErrors: createdBy === undefined ? byField : { ...byField, _form: `Who adds it: ${createdBy}` } };
  }
  const names = new Map((await getSetupSites({ db, viewer })).map((s) => [s.id, s.name]));
  const { endpoint, secret } = result;
  return { ok: true, added: { id: endpoint.id, url: endpoint.url, reach: reachOf(endpoint, names), secret } };
}

/**
 * Disables an endpoint for the viewer (an editor): nothing more is sent to
 * it, and what it had not received is given up. The words of what was done,
 * or `undefined` when there is no such endpoint.
 */
export async function disableWebhookEndpointFor({ db, viewer, id, nowMs }: { db: Db; viewer: Viewer; id: number; nowMs: number }): Promise<string | undefined> {
  mayManage(viewer);
  const result = await disableWebhookEndpoint({ db, id, by: actorOfViewer(viewer).label, nowMs });
  if (!result) return undefined;
  const givenUp = result.givenUp === 0 ? '' : `; ${count(result.givenUp, result.givenUp === 1 ? 'queued message' : 'queued messages')} given up`;
  return `Endpoint ${id} disabled: nothing more is sent to ${result.endpoint.url}${givenUp}.`;
}
