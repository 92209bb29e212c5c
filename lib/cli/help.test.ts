/**
 * The command line's help and errors: help fits 80 columns, lists every
 * option each command parses (and nothing it does not), the formats it
 * promises are the ones the command accepts, and file errors are in words,
 * never a bare ENOENT / EACCES / EISDIR.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { isIanaTimeZone } from '@/lib/contract/nameplate';
import { TEST_NAMEPLATE } from '@/test/support/synthetic-unit';
import { parseTimeOption } from './export';
import { describeFileError, fileErrorWords, withNetworkWords } from './file-errors';
import { COMMAND_HELP, HELP_WIDTH, commandHelpText, helpText, wrap } from './help';
import { COMMANDS, helpOf, main, type CliIo } from './main';

// Every option spec a command hands to parseOptions, recorded.
const parsedSpecs = vi.hoisted(() => [] as Array<Record<string, unknown>>);
vi.mock('./args', async (importOriginal) => {
  const original = await importOriginal<typeof import('./args')>();
  return {
    ...original,
    parseOptions: ((args, spec) => {
      parsedSpecs.push(spec);
      return original.parseOptions(args, spec);
    }) as typeof original.parseOptions,
  };
});

const dir = mkdtempSync(join(tmpdir(), 'millrace-help-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function run(args: string[]) {
  let out = '';
  let err = '';
  const io: CliIo = {
    stdout: new Writable({ write: (c, _e, cb) => ((out += String(c)), cb()) }),
    stderr: new Writable({ write: (c, _e, cb) => ((err += String(c)), cb()) }),
  };
  const status = await main(args, io);
  return { status, out, err };
}

const tooWide = (text: string) => text.split('\n').filter((line) => [...line].length > HELP_WIDTH);

describe('help', () => {
  it('fits 80 columns: the list of commands and every command', async () => {
    const top = await run(['--help']);
    expect(top.status).toBe(0);
    expect(tooWide(top.out)).toEqual([]);
    for (const name of Object.keys(COMMANDS)) {
      const r = await run([name, '--help']);
      expect(r.status, name).toBe(0);
      expect(r.out.length, name).toBeGreaterThan(100);
      expect(tooWide(r.out), name).toEqual([]);
    }
  });

  it('wraps what would be wider, keeping each word whole', () => {
    const lines = wrap('word '.repeat(40), 20, '  ', '    ');
    expect(lines.every((l) => l.length <= 20)).toBe(true);
    expect(lines.join(' ').split(/\s+/).filter(Boolean)).toHaveLength(40);
    // A synopsis too long for one line continues under the first option.
    const long = commandHelpText({
      name: 'long',
      summary: 'a command with many options',
      options: Array.from({ length: 8 }, (_, i) => ({ flag: `--option-${i}`, value: 'VALUE', text: `option ${i}` })),
    });
    expect(tooWide(long)).toEqual([]);
    expect(long).toMatch(/^usage: npx millrace long \[--option-0 VALUE\].*\n {25}\[--option-2 VALUE\]/);
  });

  it('has a help for every command, and a command for every help', () => {
    for (const name of Object.keys(COMMANDS)) expect(helpOf(name), name).toBeDefined();
    for (const entry of Object.values(COMMAND_HELP)) expect(Object.keys(COMMANDS)).toContain(entry.name.split(' ')[0]);
  });

  it.each(Object.values(COMMAND_HELP).map((c) => [c.name, c] as const))('lists every option "%s" parses, each with a description', async (name, entry) => {
    parsedSpecs.length = 0;
    // An option no command has, after the command's arguments: parseOptions sees the command's spec, then refuses.
    const r = await run([...name.split(' '), ...(entry.arguments ?? []).map((a) => a.name), '--no-such-option-here']);
    expect(r.status).toBe(2);
    const parsed = parsedSpecs.flatMap((spec) => Object.keys(spec).map((k) => `--${k}`)).sort();
    const listed = entry.options.map((o) => o.flag).sort();
    expect(listed).toEqual(parsed);
    const help = (await run([...name.split(' '), '--help'])).out;
    for (const o of entry.options) {
      expect(o.text.length).toBeGreaterThan(5);
      expect(help).toMatch(new RegExp(`^  ${o.flag}${o.value ? ` ${o.value}` : ''} +\\S`, 'm'));
    }
  });

  it('refuses an unknown option naming it, and points to the help', async () => {
    const r = await run(['export', '--unit', 'a/b', '--since', 'x']);
    expect(r.status).toBe(2);
    expect(r.err).toBe('millrace export: unknown option --since\n(npx millrace export --help lists its options)\n');
    const v = await run(['energy', '--nameplate']);
    expect(v.err).toBe('millrace energy: --nameplate needs a value\n(npx millrace energy --help lists its options)\n');
  });

  it('shows the time formats export accepts, each of which it parses', async () => {
    const help = (await run(['export', '--help'])).out.replace(/\n/g, ' ');
    const examples = ['2026-03-01T00:00:00Z', '2026-03-01T06:30+01:00', '2026-03-01', '1772323200000'];
    for (const example of examples) {
      expect(help).toContain(example);
      expect(() => parseTimeOption('from', example), example).not.toThrow();
    }
    expect(parseTimeOption('from', '1772323200000')).toBe(Date.parse('2026-03-01T00:00:00Z'));
    expect(parseTimeOption('from', '2026-03-01')).toBe(Date.parse('2026-03-01T00:00:00Z'));
    expect(help).toMatch(/--from is inclusive, --to exclusive/);
  });

  it("shows that energy's --tz takes IANA zone names, and the ones it names are accepted", async () => {
    const help = (await run(['energy', '--help'])).out.replace(/\n/g, ' ');
    expect(help).toContain('IANA time zone name');
    for (const zone of ['Europe/Oslo', 'America/Vancouver', 'UTC']) {
      expect(help).toContain(zone);
      expect(isIanaTimeZone(zone), zone).toBe(true);
    }
  });

  it('says "help <command>" too, and refuses an unknown one', async () => {
    expect((await run(['help', 'energy'])).out).toBe(helpOf('energy'));
    expect((await run(['help', 'nope'])).status).toBe(2);
    expect((await run(['help'])).out).toBe(helpText());
  });
});

describe('file errors in words', () => {
  const nameplate = join(dir, 'unit.json');
  writeFileSync(nameplate, JSON.stringify(TEST_NAMEPLATE));
  const folder = join(dir, 'a-folder');
  mkdirSync(folder);
  const bareCode = /\bE[A-Z]{3,}\b/;

  it.each([
    ['check', 'a missing nameplate', ['--nameplate', join(dir, 'x.json'), '--log', join(dir, 'y.csv')], `cannot read nameplate file ${join(dir, 'x.json')}: no such file`],
    ['check', 'a missing log', ['--nameplate', nameplate, '--log', join(dir, 'y.csv')], `cannot read log ${join(dir, 'y.csv')}: no such file`],
    ['check', 'a folder as the log', ['--nameplate', nameplate, '--log', folder], `cannot read log ${folder}: it is a folder, not a file`],
    ['energy', 'a folder as the nameplate', ['--nameplate', folder, '--log', join(dir, 'y.csv')], `cannot read nameplate file ${folder}: it is a folder, not a file`],
    ['energy', 'a missing log', ['--nameplate', nameplate, '--log', join(dir, 'y.csv')], `cannot read log ${join(dir, 'y.csv')}: no such file`],
    ['units', 'a missing fleet file', ['import', join(dir, 'fleet.json')], `cannot read fleet file ${join(dir, 'fleet.json')}: no such file`],
  ])('%s: %s', async (command, _what, args, message) => {
    const r = await run([command, ...args]);
    expect(r.status).toBe(2);
    expect(r.err).toBe(`millrace ${command}: ${message}\n`);
    expect(r.err).not.toMatch(bareCode);
  });

  it('puts a file error no command worded in words too (the embedded database folder blocked by a file)', () => {
    const blocker = join(dir, 'a-file');
    writeFileSync(blocker, '');
    const env: NodeJS.ProcessEnv = { ...process.env, DATA_DIR: join(blocker, 'data') };
    delete env.DATABASE_URL;
    const r = spawnSync(process.execPath, [fileURLToPath(new URL('../../bin/millrace.mjs', import.meta.url)), 'export', '--unit', 'a/b'], { env, encoding: 'utf8' });
    expect(r.status).toBe(2);
    expect(r.stderr).toBe(`millrace export: cannot create folder ${join(blocker, 'data')}: a file of that name is in the way\n`);
  });

  it('says a refused database connection in words', async () => {
    const port = await new Promise<number>((resolve) => {
      const server = createServer().listen(0, '127.0.0.1', () => {
        const p = (server.address() as { port: number }).port;
        server.close(() => resolve(p));
      });
    });
    const env: NodeJS.ProcessEnv = { ...process.env, DATABASE_URL: `postgres://postgres@127.0.0.1:${port}/nothing` };
    const r = spawnSync(process.execPath, [fileURLToPath(new URL('../../bin/millrace.mjs', import.meta.url)), 'export', '--unit', 'a/b'], { env, encoding: 'utf8' });
    expect(r.status).toBe(2);
    expect(r.stderr).toContain(`connection refused at 127.0.0.1:${port} (is the server running there?)`);
    expect(r.stderr).not.toMatch(bareCode);
    expect(withNetworkWords('x: getaddrinfo ENOTFOUND db.example', Object.assign(new Error('getaddrinfo ENOTFOUND db.example'), { code: 'ENOTFOUND', hostname: 'db.example' }))).toBe(
      'x: no such host db.example',
    );
    expect(withNetworkWords('unrelated', new Error('other'))).toBe('unrelated');
  });

  it('puts the codes a user meets in words, and an unlisted one without its code', () => {
    const error = (code: string, message: string, syscall = 'open') => Object.assign(new Error(message), { code, syscall, path: '/x' });
    expect(describeFileError(error('EACCES', "EACCES: permission denied, open '/x'"), 'log')).toBe('cannot read log /x: permission denied');
    expect(describeFileError(error('ENOSPC', 'ENOSPC: no space left on device, write', 'write'), 'file')).toBe(
      'cannot write file /x: no space left on the device',
    );
    expect(describeFileError(error('EEXIST', "EEXIST: file already exists, mkdir '/x'", 'mkdir'), 'file')).toBe(
      'cannot create folder /x: a file of that name is in the way',
    );
    expect(fileErrorWords(error('EXDEV', "EXDEV: cross-device link not permitted, rename '/a' -> '/b'"))).toBe('cross-device link not permitted');
    for (const code of ['ENOENT', 'EACCES', 'EISDIR', 'ENOTDIR', 'EPERM', 'EMFILE', 'ELOOP']) {
      expect(fileErrorWords(error(code, `${code}: x`)), code).not.toMatch(bareCode);
    }
  });
});
