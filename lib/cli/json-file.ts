/**
 * Reads a JSON file and validates it with a contract schema. Every problem is
 * reported with the file and the field's path; a JSON syntax error names the
 * line.
 */
import { readFile } from 'node:fs/promises';
import type { z } from 'zod';
import { AppError } from '@/lib/errors/app-error';
import { formatIssues } from '@/lib/contract/telemetry';
import { fleetSchema, nameplateSchema, type Nameplate } from '@/lib/contract/nameplate';
import { describeFileError } from './file-errors';

/** Result of reading a file: the value, or every problem as "path: reason". */
export type JsonFileResult<T> = { ok: true; value: T } | { ok: false; problems: string[] };

function lineOf(text: string, position: number): number {
  return text.slice(0, position).split('\n').length;
}

/** The role of a file read with a contract schema, as its errors name it. */
const ROLE = new Map<z.ZodType, string>([
  [nameplateSchema, 'nameplate file'],
  [fleetSchema, 'fleet file'],
]);

/**
 * Reads and validates `path`; I/O and syntax errors throw AppError naming the
 * file, in words ("cannot read nameplate file x.json: no such file"). `what`
 * names the file's role (by default from the schema).
 */
export async function readJsonFile<S extends z.ZodType>(path: string, schema: S, what = ROLE.get(schema) ?? 'file'): Promise<JsonFileResult<z.output<S>>> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (cause) {
    throw new AppError('bad-input', 'cli', describeFileError(cause, what, path), { cause });
  }
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (cause) {
    const match = /position (\d+)/.exec((cause as Error).message);
    const where = match ? `line ${lineOf(text, Number(match[1]))}: ` : '';
    throw new AppError('bad-input', 'cli', `${path}: ${where}not valid JSON (${(cause as Error).message})`, { cause });
  }
  const parsed = schema.safeParse(raw);
  if (parsed.success) return { ok: true, value: parsed.data };
  return { ok: false, problems: formatIssues(parsed.error.issues) };
}

/** Reads a nameplate file; any problem throws AppError naming the file and the field. */
export async function readNameplateFile(path: string): Promise<Nameplate> {
  const result = await readJsonFile(path, nameplateSchema);
  if (result.ok) return result.value;
  throw new AppError('bad-input', 'cli', `${path}: invalid nameplate\n${result.problems.map((p) => `  ${p}`).join('\n')}`);
}
