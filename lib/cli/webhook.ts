/**
 * `npx millrace webhook ...` (contract, section 7):
 *
 * - `webhook add --url URL [--site SITE] [--min-severity S] [--json]` adds an
 *   endpoint that alerts are posted to, signed as the Standard Webhooks
 *   specification says; prints its secret once.
 * - `webhook list [--json]` lists the endpoints and what their queues hold.
 * - `webhook disable ID` stops sending to one; what it had not received yet
 *   is given up with the reason recorded.
 */
import { disableWebhookEndpoint, insertWebhookEndpoint, listWebhookEndpoints, type WebhookEndpointSummary } from '@/lib/alerts/webhooks/queries';
import { AppError } from '@/lib/errors/app-error';
import { parseOptions } from './args';
import { openCliDatabase } from './database';
import type { CliIo } from './main';

/** Who the command line acts as, in the endpoint's row and the audit log. */
const ACTOR = 'command line';
const FLAG_OF_FIELD: Record<string, string> = { url: '--url', siteId: '--site', minSeverity: '--min-severity', createdBy: '--url' };

function reach(e: { siteId: string | null; minSeverity: string }): string {
  const which = e.minSeverity === 'alarm' ? 'alarms' : `${e.minSeverity} and above`;
  return `${which} of ${e.siteId === null ? 'every site' : `site ${e.siteId}`}`;
}

async function add(args: string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseOptions(args, {
    url: { type: 'string', required: true },
    site: { type: 'string' },
    'min-severity': { type: 'string' },
    json: { type: 'boolean' },
  });
  if (positionals.length > 0) throw new AppError('bad-input', 'cli-usage', `webhook add: unexpected argument "${positionals[0]}"`);
  const handle = await openCliDatabase();
  try {
    const result = await insertWebhookEndpoint({ db: handle.db, url: values.url!, siteId: values.site ?? null, minSeverity: values['min-severity'] ?? 'warning', createdBy: ACTOR });
    if (!result.ok) {
      const [field, message] = Object.entries(result.fieldErrors)[0] ?? ['url', 'refused'];
      throw new AppError('bad-input', 'cli', `${FLAG_OF_FIELD[field] ?? field}: ${message}${field === 'siteId' ? ` (${handle.location})` : ''}`);
    }
    const { endpoint, secret } = result;
    if (values.json) {
      io.stdout.write(`${JSON.stringify({ id: endpoint.id, url: endpoint.url, siteId: endpoint.siteId, minSeverity: endpoint.minSeverity, secret })}\n`);
      return 0;
    }
    io.stdout.write(
      `Webhook endpoint ${endpoint.id} added: ${reach(endpoint)}, posted to ${endpoint.url}\n` +
        `Its signing secret, shown once:\n\n  ${secret}\n\n` +
        `Each change of an alert is one JSON POST, signed as the Standard Webhooks\n` +
        `specification says (headers webhook-id, webhook-timestamp, webhook-signature).\n` +
        `Verify it with this secret; a retry keeps the same webhook-id.\n`,
    );
    return 0;
  } finally {
    await handle.close();
  }
}

function listLine(e: WebhookEndpointSummary): string {
  const state = e.enabled ? 'enabled' : 'disabled';
  return `${String(e.id).padStart(4)}  ${state.padEnd(8)}  ${reach(e)}\n      ${e.url}\n      ${e.pending} queued, ${e.delivered} delivered, ${e.givenUp} given up; added ${e.createdAt.toISOString()} by ${e.createdBy}\n`;
}

async function list(args: string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseOptions(args, { json: { type: 'boolean' } });
  if (positionals.length > 0) throw new AppError('bad-input', 'cli-usage', `webhook list: unexpected argument "${positionals[0]}"`);
  const handle = await openCliDatabase();
  try {
    const endpoints = await listWebhookEndpoints({ db: handle.db });
    if (values.json) {
      io.stdout.write(`${JSON.stringify(endpoints.map((e) => ({ ...e, createdAt: e.createdAt.toISOString() })))}\n`);
      return 0;
    }
    if (endpoints.length === 0) {
      io.stdout.write(`No webhook endpoints (${handle.location}); add one with npx millrace webhook add --url URL\n`);
      return 0;
    }
    io.stdout.write(endpoints.map(listLine).join(''));
    return 0;
  } finally {
    await handle.close();
  }
}

async function disable(args: string[], io: CliIo): Promise<number> {
  const { positionals } = parseOptions(args, {});
  if (positionals.length > 1) throw new AppError('bad-input', 'cli-usage', `webhook disable: unexpected argument "${positionals[1]}"`);
  const raw = positionals[0];
  if (raw === undefined) throw new AppError('bad-input', 'cli', 'webhook disable: the endpoint id is missing (webhook list shows them)');
  if (!/^[1-9][0-9]{0,14}$/.test(raw)) throw new AppError('bad-input', 'cli', `webhook disable: the endpoint id is a whole number, got "${raw}"`);
  const handle = await openCliDatabase();
  try {
    const result = await disableWebhookEndpoint({ db: handle.db, id: Number(raw), by: ACTOR });
    if (!result) throw new AppError('not-found', 'cli', `webhook disable: no endpoint ${raw} (${handle.location}); webhook list shows them`);
    io.stdout.write(`Webhook endpoint ${raw} disabled: nothing more is sent to ${result.endpoint.url}` + (result.givenUp > 0 ? `; ${result.givenUp} queued messages given up.\n` : '.\n'));
    return 0;
  } finally {
    await handle.close();
  }
}

export async function run(args: string[], io: CliIo): Promise<number> {
  const [sub, ...rest] = args;
  if (sub === 'add') return add(rest, io);
  if (sub === 'list') return list(rest, io);
  if (sub === 'disable') return disable(rest, io);
  const what = 'webhook add, webhook list or webhook disable';
  throw new AppError('bad-input', 'cli-usage', sub === undefined ? `webhook: say what to do (${what})` : `webhook: unknown sub-command "${sub}" (${what})`);
}
