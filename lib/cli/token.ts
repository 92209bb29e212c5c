/**
 * `npx millrace token create --email E [--name N] [--json]` (contract,
 * section 4): prints a new API token of that person once; only its hash is
 * kept. It carries the person's role and sites (`Authorization: Bearer`).
 */
import { createApiToken } from '@/lib/auth/api-tokens';
import { getPersonByEmail } from '@/lib/auth/people';
import { AppError } from '@/lib/errors/app-error';
import { parseOptions } from './args';
import { openCliDatabase } from './database';
import type { CliIo } from './main';

async function create(args: string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseOptions(args, { email: { type: 'string', required: true }, name: { type: 'string' }, json: { type: 'boolean' } });
  if (positionals.length > 0) throw new AppError('bad-input', 'cli-usage', `token create: unexpected argument "${positionals[0]}"`);
  const handle = await openCliDatabase();
  try {
    const person = await getPersonByEmail({ db: handle.db, email: values.email! });
    if (!person) throw new AppError('not-found', 'cli', `--email: nobody has the address ${values.email} (${handle.location}); add them with npx millrace user add`);
    if (person.disabled) throw new AppError('bad-input', 'cli', `--email: ${person.email} is disabled; enable them on the People page first`);
    const name = values.name?.trim() || 'command line';
    const { token } = await createApiToken({ db: handle.db, actor: { label: 'command line', personId: null }, person, name });
    if (values.json) {
      io.stdout.write(`${JSON.stringify({ token })}\n`);
      return 0;
    }
    io.stdout.write(
      `API token "${name}" of ${person.email} (${person.role}). Shown once: only a hash is kept.\n\n  ${token}\n\n` +
        `Send it as the header  Authorization: Bearer <token>. Revoke it on the person's page (People).\n`,
    );
    return 0;
  } finally {
    await handle.close();
  }
}

export async function run(args: string[], io: CliIo): Promise<number> {
  const [sub, ...rest] = args;
  if (sub === 'create') return create(rest, io);
  throw new AppError('bad-input', 'cli-usage', sub === undefined ? 'token: say what to do (token create)' : `token: unknown sub-command "${sub}" (token create)`);
}
