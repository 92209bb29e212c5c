/**
 * `npx millrace export --unit SITE/UNIT [--from TIME] [--to TIME]`
 * (contract, section 4): the unit's stored samples, ordered by `ts`, as a CSV
 * log on standard output, the format `check` and `energy` read: a header of
 * telemetry field names, `ts` in ISO-8601 UTC, empty cells for absent values.
 *
 * `--from` is inclusive and `--to` exclusive; each takes an ISO-8601 time with
 * offset, a date (YYYY-MM-DD, midnight UTC) or epoch milliseconds. Rows are
 * streamed (a cursor on PostgreSQL, pages by time on the embedded database),
 * so a year of one unit never sits in memory.
 */
import { once } from 'node:events';
import type { DatabaseHandle } from '@/db/client';
import { SLUG } from '@/lib/contract/nameplate';
import { TELEMETRY_FIELDS, VALUE_FIELDS, columnOfField, describeValue, parseTimestampMs } from '@/lib/contract/telemetry';
import { AppError } from '@/lib/errors/app-error';
import { parseOptions } from './args';
import { openCliDatabase } from './database';
import type { CliIo } from './main';

/** Rows a page or a cursor step holds. */
export const EXPORT_PAGE_ROWS = 5000;

type Row = { t: number } & Record<string, number | null>;

/** Parses a --from/--to value to epoch ms; throws AppError naming the option. */
export function parseTimeOption(option: string, value: string): number {
  const date = /^(\d{4})-(\d{2})-(\d{2})$/.exec(value);
  const ms = date ? Date.UTC(Number(date[1]), Number(date[2]) - 1, Number(date[3])) : parseTimestampMs(value.trim());
  if (ms === undefined || Number.isNaN(ms) || (date && new Date(ms).toISOString().slice(0, 10) !== value)) {
    throw new AppError(
      'bad-input',
      'cli',
      `--${option}: expected an ISO-8601 time with offset (2026-03-01T00:00:00Z), a date (2026-03-01) or epoch milliseconds, got ${describeValue(value)}`,
    );
  }
  return ms;
}

/** One CSV line of a stored row. */
function csvLine(row: Row): string {
  let line = new Date(Number(row.t)).toISOString();
  for (const field of VALUE_FIELDS) {
    const v = row[field];
    line += v === null || v === undefined ? ',' : `,${Number(v)}`;
  }
  return `${line}\n`;
}

const SELECT = `select (extract(epoch from ts) * 1000)::float8 as t, ${VALUE_FIELDS.map((f) => `${columnOfField(f)} as "${f}"`).join(', ')}
  from telemetry_samples where unit_key = $1 and ts >= to_timestamp($2 / 1000.0) and ts < to_timestamp($3 / 1000.0)`;

/** The unit's rows in [fromMs, toMs), in time order, a page at a time. */
async function* rowsOf(handle: DatabaseHandle, unitKey: number, fromMs: number, toMs: number): AsyncGenerator<Row[]> {
  if (handle.sql) {
    const cursor = handle.sql.unsafe(`${SELECT} order by ts`, [unitKey, fromMs, toMs]).cursor(EXPORT_PAGE_ROWS);
    for await (const rows of cursor) yield rows as unknown as Row[];
    return;
  }
  // Keyset pages: each page starts after the last ts of the one before.
  let after = fromMs;
  let inclusive = true;
  for (;;) {
    const { rows } = await handle.pglite!.query<Row>(
      `${SELECT.replace('ts >= to_timestamp($2 / 1000.0)', inclusive ? 'ts >= to_timestamp($2 / 1000.0)' : 'ts > to_timestamp($2 / 1000.0)')} order by ts limit ${EXPORT_PAGE_ROWS}`,
      [unitKey, after, toMs],
    );
    if (rows.length === 0) return;
    yield rows;
    if (rows.length < EXPORT_PAGE_ROWS) return;
    after = Number(rows[rows.length - 1]!.t);
    inclusive = false;
  }
}

export async function run(args: string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseOptions(args, {
    unit: { type: 'string', required: true },
    from: { type: 'string' },
    to: { type: 'string' },
  });
  if (positionals.length > 0) throw new AppError('bad-input', 'cli', `export: unexpected argument "${positionals[0]}"`);
  const match = /^([^/]+)\/([^/]+)$/.exec(values.unit!);
  if (!match || !SLUG.test(match[1]!) || !SLUG.test(match[2]!)) {
    throw new AppError('bad-input', 'cli', `--unit: expected SITE/UNIT (two slugs of a-z, 0-9 and -), got ${describeValue(values.unit)}`);
  }
  const [, siteId, unitId] = match as unknown as [string, string, string];
  const fromMs = values.from === undefined ? 0 : parseTimeOption('from', values.from);
  const toMs = values.to === undefined ? 8_640_000_000_000_000 : parseTimeOption('to', values.to);
  if (toMs <= fromMs) {
    throw new AppError('bad-input', 'cli', `--to (${new Date(toMs).toISOString()}) must be later than --from (${new Date(fromMs).toISOString()})`);
  }

  const handle = await openCliDatabase();
  try {
    const runner = handle.sql
      ? async (text: string, params: unknown[]) => (await handle.sql!.unsafe(text, params as never[])) as unknown as Array<Record<string, unknown>>
      : async (text: string, params: unknown[]) => (await handle.pglite!.query<Record<string, unknown>>(text, params)).rows;
    const [unit] = await runner('select key, site_id from units where id = $1', [unitId]);
    if (!unit) {
      throw new AppError('bad-input', 'cli', `--unit: unit "${unitId}" is not registered in ${handle.location}`);
    }
    if (unit.site_id !== siteId) {
      throw new AppError('bad-input', 'cli', `--unit: unit "${unitId}" is registered under site "${String(unit.site_id)}", not "${siteId}"`);
    }

    let broken = false;
    const onError = () => {
      broken = true; // e.g. `| head` closed the pipe: stop quietly.
    };
    io.stdout.on('error', onError);
    const write = async (text: string) => {
      if (broken) return;
      if (!io.stdout.write(text)) await Promise.race([once(io.stdout, 'drain'), once(io.stdout, 'close')]);
    };
    await write(`${TELEMETRY_FIELDS.join(',')}\n`);
    let count = 0;
    for await (const rows of rowsOf(handle, Number(unit.key), fromMs, toMs)) {
      let chunk = '';
      for (const row of rows) chunk += csvLine(row);
      count += rows.length;
      await write(chunk);
      if (broken) break;
    }
    io.stdout.off('error', onError);
    io.stderr.write(`millrace export: ${count} sample${count === 1 ? '' : 's'} of ${siteId}/${unitId} from ${handle.location}\n`);
    return 0;
  } finally {
    await handle.close();
  }
}
