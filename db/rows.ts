/**
 * Rows of raw SQL (`db.execute`), whichever driver produced them. postgres-js
 * answers an array, PGlite `{ rows }`; bigint and numeric columns arrive as
 * text on one and numbers on the other, jsonb as text or as parsed JSON. A
 * statement's rows are parsed with a zod schema written beside it
 * (`parseRows`), so a column renamed in the SQL or the schema fails loudly,
 * naming the column, instead of drifting from a hand-typed cast.
 */
import { z } from 'zod';
import { AppError } from '@/lib/errors/app-error';

/**
 * The rows of a `db.execute` result as they came, unchecked: for statements whose every column
 * is text or a float the driver gives as a number, read where speed matters.
 */
export function rowsOf<T>(result: unknown): T[] {
  if (Array.isArray(result)) return result as T[];
  return ((result as { rows?: T[] }).rows ?? []) as T[];
}

/** A number column: float, or bigint/numeric as text. */
export const dbNumber = z.union([z.number(), z.string().regex(/^-?\d+(\.\d+)?(e[-+]?\d+)?$/i)]).transform(Number);

/** A nullable number column. */
export const dbNumberOrNull = dbNumber.nullable();

/** A timestamptz column: a Date on postgres-js, text on some PGlite paths. */
export const dbTime = z.union([z.date(), z.string(), z.number()]).transform((v) => (v instanceof Date ? v : new Date(v)));

/** A jsonb column checked by `schema`: parsed JSON on postgres-js, text on some PGlite paths. */
export function dbJson<S extends z.ZodType>(schema: S) {
  return z.preprocess((v) => {
    if (typeof v !== 'string') return v;
    try {
      return JSON.parse(v) as unknown;
    } catch {
      return v; // not JSON: the schema refuses the text, naming the column
    }
  }, schema);
}

const compiled = new WeakMap<z.ZodType, z.ZodType>();

/** zod's generated parser for a row schema, made once per schema: some 3× faster a row than its interpreter. */
function compiledOf(schema: z.ZodType): z.ZodType {
  let fast = compiled.get(schema);
  if (fast === undefined) {
    fast = z.compile(schema) as z.ZodType;
    compiled.set(schema, fast);
  }
  return fast;
}

/**
 * The rows of a `db.execute` result, each parsed by `schema`; a row that does not fit is an
 * internal error naming the statement, the row and the column.
 * @example parseRows('units', z.object({ id: z.string() }), [{ id: 'qv-01' }]) // [{ id: 'qv-01' }]
 */
export function parseRows<S extends z.ZodType>(what: string, schema: S, result: unknown): Array<z.output<S>> {
  const fast = compiledOf(schema);
  return rowsOf<unknown>(result).map((row, i) => {
    const quick = fast.safeParse(row);
    if (quick.success) return quick.data as z.output<S>;
    // The interpreter says what is wrong in its own words (the compiled parser agrees on what passes).
    const parsed = schema.safeParse(row);
    if (parsed.success) return parsed.data;
    const issue = parsed.error.issues[0]!;
    throw new AppError('internal', 'db', `${what}: row ${i + 1}, column ${issue.path.join('.') || '?'}: ${issue.message}`, { cause: parsed.error });
  });
}
