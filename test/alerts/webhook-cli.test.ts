/**
 * `npx millrace webhook add / list / disable` as a user runs them (the bin,
 * a data folder of their own): the secret printed once in the form contract
 * section 7 gives it, JSON on --json, the list without the secret, and
 * refusals that name the option. The secret is checked with the
 * `standardwebhooks` library (the Standard Webhooks reference verifier).
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Webhook } from 'standardwebhooks';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { webhookHeaders } from '@/lib/alerts/webhooks/sign';
import { runMillrace } from '@/test/support/cli';
import { testFleet, testTag } from '@/test/support/ingest';

const dir = mkdtempSync(join(tmpdir(), 'millrace-webhook-cli-'));
const fleet = testFleet(testTag(), { windUnits: 1, hydroUnits: 0 });
const siteId = fleet.sites[0]!.id;

const millrace = (args: string[]) => runMillrace(args, join(dir, 'data'));

beforeAll(async () => {
  const file = join(dir, 'FLEET.json');
  writeFileSync(file, JSON.stringify(fleet));
  expect((await millrace(['units', 'import', file])).status).toBe(0);
}, 60_000);
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('npx millrace webhook', () => {
  it('adds endpoints, printing the secret once, and lists them without it', async () => {
    const json = await millrace(['webhook', 'add', '--url', 'http://127.0.0.1:9/hook', '--json']);
    expect(json.status).toBe(0);
    const first = JSON.parse(json.out) as { id: number; url: string; siteId: string | null; minSeverity: string; secret: string };
    expect(first).toMatchObject({ url: 'http://127.0.0.1:9/hook', siteId: null, minSeverity: 'warning' });
    // Contract section 7: whsec_ then base64 of the key; the reference verifier accepts what it signs.
    expect(first.secret).toMatch(/^whsec_[A-Za-z0-9+/]{43}=$/);
    const headers = webhookHeaders({ secret: first.secret, id: 'msg_cli', timestampS: Math.floor(Date.now() / 1000), body: '{}' });
    expect(new Webhook(first.secret).verify('{}', headers)).toEqual({});

    const words = await millrace(['webhook', 'add', '--url', 'https://hooks.example.org/in', '--site', siteId, '--min-severity', 'alarm']);
    expect(words.status).toBe(0);
    expect(words.out).toContain(`added: alarms of site ${siteId}, posted to https://hooks.example.org/in`);
    expect(words.out).toContain('shown once');
    const secret = /^ {2}(whsec_\S+)$/m.exec(words.out)?.[1];
    expect(secret).toMatch(/^whsec_/);
    expect(secret).not.toBe(first.secret);

    const list = await millrace(['webhook', 'list', '--json']);
    expect(list.status).toBe(0);
    const listed = JSON.parse(list.out) as Array<Record<string, unknown>>;
    expect(listed.map((e) => [e.url, e.siteId, e.minSeverity, e.enabled, e.pending, e.createdBy])).toEqual([
      ['http://127.0.0.1:9/hook', null, 'warning', true, 0, 'command line'],
      ['https://hooks.example.org/in', siteId, 'alarm', true, 0, 'command line'],
    ]);
    expect(list.out).not.toContain(first.secret.slice(6));
    expect(list.out).not.toContain(secret!.slice(6));
    const readable = await millrace(['webhook', 'list']);
    expect(readable.out).toContain('http://127.0.0.1:9/hook');
    expect(readable.out).toContain(`alarms of site ${siteId}`);
    expect(readable.out).not.toContain('whsec_');

    const disabled = await millrace(['webhook', 'disable', String(first.id)]);
    expect(disabled.status).toBe(0);
    expect(disabled.out).toContain(`Webhook endpoint ${first.id} disabled`);
    expect((JSON.parse((await millrace(['webhook', 'list', '--json'])).out) as Array<{ enabled: boolean }>).map((e) => e.enabled)).toEqual([false, true]);
  }, 90_000);

  it.each([
    ['a non-http address', ['add', '--url', 'ftp://files.example.org/x'], 'millrace webhook: --url: must be an http:// or https:// address, got "ftp://files.example.org/x"'],
    ['an unknown site', ['add', '--url', 'https://hooks.example.org/in', '--site', 'no-such-site'], 'millrace webhook: --site: no site "no-such-site": add the site first'],
    ['an unknown severity', ['add', '--url', 'https://hooks.example.org/in', '--min-severity', 'loud'], 'millrace webhook: --min-severity: must be info, warning or alarm, got "loud"'],
    ['no address', ['add'], 'millrace webhook: --url is required'],
    ['an endpoint that does not exist', ['disable', '999'], 'millrace webhook: webhook disable: no endpoint 999'],
    ['an id that is not a number', ['disable', 'first'], 'millrace webhook: webhook disable: the endpoint id is a whole number, got "first"'],
    ['an unknown sub-command', ['remove'], 'millrace webhook: webhook: unknown sub-command "remove"'],
  ])('refuses %s with exit status 2, naming it', async (_what, args, words) => {
    const r = await millrace(['webhook', ...args]);
    expect(r.status).toBe(2);
    expect(r.err.startsWith(words)).toBe(true);
    expect(r.out).toBe('');
  }, 60_000);
});
