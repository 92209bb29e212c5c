/**
 * `npx millrace units import FLEET.json` (contract, section 4): registers or
 * updates sites and units, all or nothing. Every problem is printed with its
 * path and the exit status is 2 when anything is invalid.
 */
import { LOCAL_VIEWER } from '@/lib/auth/viewer';
import { fleetSchema } from '@/lib/contract/nameplate';
import { AppError } from '@/lib/errors/app-error';
import { importFleetFile } from '@/lib/setup/fleet-import';
import { readJsonFile } from './json-file';
import { openCliDatabase } from './database';
import type { CliIo } from './main';

export async function run(args: string[], io: CliIo): Promise<number> {
  const [sub, file, ...extra] = args;
  if (sub !== 'import') {
    throw new AppError('bad-input', 'cli', `expected "units import FLEET.json", got "units ${args.join(' ')}"`);
  }
  if (file === undefined) throw new AppError('bad-input', 'cli', 'units import: the fleet file is missing (FLEET.json)');
  if (extra.length > 0) throw new AppError('bad-input', 'cli', `units import: unexpected argument "${extra[0]}"`);

  const parsed = await readJsonFile(file, fleetSchema);
  if (!parsed.ok) {
    io.stderr.write(`${file}: ${parsed.problems.length} problem${parsed.problems.length > 1 ? 's' : ''}, nothing was changed\n`);
    for (const problem of parsed.problems) io.stderr.write(`  ${problem}\n`);
    return 2;
  }
  const handle = await openCliDatabase();
  try {
    // The same check and import as the setup screen's (whoever runs the command may change everything).
    const report = await importFleetFile({ db: handle.db, viewer: LOCAL_VIEWER, raw: parsed.value, apply: true });
    const { problems } = report;
    if (!report.ok || !report.applied) {
      io.stderr.write(`${file}: ${problems.length} problem${problems.length > 1 ? 's' : ''}, nothing was changed\n`);
      for (const problem of problems) io.stderr.write(`  ${problem}\n`);
      return 2;
    }
    const result = report.applied;
    io.stdout.write(
      `${file}: sites ${result.sitesCreated} added, ${result.sitesUpdated} updated; ` +
        `units ${result.unitsCreated} added, ${result.unitsUpdated} updated (${handle.location})\n`,
    );
    return 0;
  } finally {
    await handle.close();
  }
}
