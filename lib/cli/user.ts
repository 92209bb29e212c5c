/**
 * `npx millrace user add --email E --role admin|operator|crew|owner
 * [--site SITE ...]` (contract, section 4): adds a person. The password is
 * read from standard input, one line (typed without echo on a terminal, or
 * piped: `printf '%s\n' "$PW" | npx millrace user add ...`); a weak one is
 * refused with the reason. Crew and owners need at least one site.
 */
import { createInterface } from 'node:readline';
import { Writable } from 'node:stream';
import { addPerson } from '@/lib/auth/people';
import { AppError } from '@/lib/errors/app-error';
import { parseOptions } from './args';
import { openCliDatabase } from './database';
import type { CliIo } from './main';

/** Reads one line of standard input; on a terminal the typing is not shown. */
export async function readPasswordLine(io: CliIo): Promise<string> {
  const input = io.stdin ?? process.stdin;
  const terminal = input.isTTY === true;
  if (terminal) io.stderr.write('Password (at least 12 characters; not shown): ');
  const muted = new Writable({ write: (_c, _e, cb) => cb() });
  const rl = createInterface({ input, output: terminal ? muted : undefined, terminal });
  try {
    const line = await new Promise<string | undefined>((resolve) => {
      rl.once('line', (l) => resolve(l));
      rl.once('close', () => resolve(undefined));
    });
    if (terminal) io.stderr.write('\n');
    if (line === undefined) throw new AppError('bad-input', 'cli', 'no password on standard input: give it as one line');
    return line.replace(/\r$/, '');
  } finally {
    rl.close();
  }
}

async function add(args: string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseOptions(args, {
    email: { type: 'string', required: true },
    role: { type: 'string', required: true },
    site: { type: 'string', multiple: true },
  });
  if (positionals.length > 0) throw new AppError('bad-input', 'cli-usage', `user add: unexpected argument "${positionals[0]}"`);
  const password = await readPasswordLine(io);
  const handle = await openCliDatabase();
  try {
    const result = await addPerson({
      db: handle.db,
      actor: { label: 'command line', personId: null },
      person: { email: values.email!, role: values.role as never, password, siteIds: values.site ?? [] },
    });
    if (!result.ok) {
      const words: Record<string, string> = { email: '--email', role: '--role', siteIds: '--site', password: 'password' };
      for (const [field, problem] of Object.entries(result.fieldErrors)) io.stderr.write(`millrace user add: ${words[field] ?? field}: ${problem}\n`);
      return 2;
    }
    const p = result.person;
    io.stdout.write(`Added ${p.email} as ${p.role}${values.site?.length ? ` of ${values.site.join(', ')}` : ''} (${handle.location}). They can sign in now.\n`);
    return 0;
  } finally {
    await handle.close();
  }
}

export async function run(args: string[], io: CliIo): Promise<number> {
  const [sub, ...rest] = args;
  if (sub === 'add') return add(rest, io);
  throw new AppError('bad-input', 'cli-usage', sub === undefined ? 'user: say what to do (user add)' : `user: unknown sub-command "${sub}" (user add)`);
}
