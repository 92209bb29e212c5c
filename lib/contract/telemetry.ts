/**
 * The telemetry sample of the data contract (shared/contract.md, section 1).
 * This schema is the single source of truth for MQTT payloads, CSV logs,
 * API bodies and the database columns.
 */
import { z } from 'zod';

/** Field names of a sample, in the order a CSV log writes them. */
export const TELEMETRY_FIELDS = [
  'ts',
  'rpm',
  'hz',
  'vab',
  'vbc',
  'vca',
  'ia',
  'ib',
  'ic',
  'kw',
  'statorC',
  'ambientC',
  'windMs',
  'airKgM3',
  'flowM3s',
  'headM',
] as const;

export type TelemetryField = (typeof TELEMETRY_FIELDS)[number];

/** Every field but `ts`: the measured values of a sample, in CSV and column order. */
export const VALUE_FIELDS = TELEMETRY_FIELDS.filter((f): f is Exclude<TelemetryField, 'ts'> => f !== 'ts');

export type ValueField = Exclude<TelemetryField, 'ts'>;

/** The snake_case database column of a field (`statorC` -> `stator_c`, `airKgM3` -> `air_kg_m3`). */
export function columnOfField(field: TelemetryField): string {
  return field.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);
}

/** Fields every sample must carry. */
export const REQUIRED_TELEMETRY_FIELDS = ['ts', 'rpm', 'vab'] as const;

/** Line voltage above this is outside physical sense for a 1–100 kW unit (contract, section 1). */
export const MAX_LINE_VOLTS = 10_000;
/** A sample time later than now plus this is invalid (contract, section 1). */
export const MAX_FUTURE_MS = 5 * 60_000;
/** A sample time before this is invalid (contract, section 1). */
export const MIN_TS_MS = Date.UTC(2000, 0, 1);

/** Renders an offending input for a message a person can act on. */
export function describeValue(value: unknown): string {
  if (value === undefined) return 'nothing';
  if (value === null) return 'null';
  if (typeof value === 'string') return JSON.stringify(value.length > 40 ? `${value.slice(0, 40)}…` : value);
  if (typeof value === 'number') return String(value);
  if (Array.isArray(value)) return 'a list';
  if (typeof value === 'object') return 'an object';
  return String(value);
}

/**
 * A finite number of the given measure within [min, max].
 * Messages read "expected a number of volts, got \"abc\"".
 */
function measure(what: string, min: number, max: number) {
  return z
    .number({ error: (issue) => `expected a number of ${what}, got ${describeValue(issue.input)}` })
    // Built-in bounds rather than refinements: the same words, some 25 % less time per sample.
    .min(min, { error: (issue) => `${describeValue(issue.input)} ${what} is below ${min}, outside physical sense` })
    .max(max, { error: (issue) => `${describeValue(issue.input)} ${what} is above ${max}, outside physical sense` });
}

const ISO_WITH_OFFSET = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(?::\d{2}(?:\.\d{1,9})?)?(?:Z|[+-]\d{2}:?\d{2})$/i;

/** Parses `ts` (ISO-8601 with offset, or epoch milliseconds) to epoch ms; undefined when malformed. */
export function parseTimestampMs(value: unknown): number | undefined {
  if (typeof value === 'number') return Number.isFinite(value) ? value : undefined;
  if (typeof value !== 'string') return undefined;
  if (/^\d{9,15}$/.test(value)) return Number(value);
  if (!ISO_WITH_OFFSET.test(value)) return undefined;
  const ms = Date.parse(value);
  return Number.isNaN(ms) ? undefined : ms;
}

/**
 * Builds the sample schema. `nowMs` fixes "now" for the future-timestamp
 * check (tests and offline logs pass their own).
 */
export function telemetrySampleSchema(nowMs: () => number = Date.now) {
  // z.compile: zod's own generated parser for this schema, some 4× faster a sample than
  // its interpreter; a sample it does not accept goes to the interpreter, whose issues
  // (and so the words below) are the same. Tested against the interpreter in telemetry.test.ts.
  return z.compile(sampleObject(nowMs));
}

/** The sample schema as written (what {@link telemetrySampleSchema} compiles). */
export function sampleObject(nowMs: () => number = Date.now) {
  return z.object({
    ts: z.unknown().transform((value, ctx) => {
      const ms = parseTimestampMs(value);
      if (ms === undefined) {
        ctx.addIssue({
          code: 'custom',
          message: `expected an ISO-8601 time with offset or epoch milliseconds, got ${describeValue(value)}`,
        });
        return z.NEVER;
      }
      if (ms < MIN_TS_MS) {
        ctx.addIssue({ code: 'custom', message: `${new Date(ms).toISOString()} is before 2000` });
        return z.NEVER;
      }
      if (ms > nowMs() + MAX_FUTURE_MS) {
        ctx.addIssue({
          code: 'custom',
          message: `${new Date(ms).toISOString()} is more than 5 minutes in the future`,
        });
        return z.NEVER;
      }
      return ms;
    }),
    rpm: measure('rev/min', 0, 100_000),
    hz: measure('hertz', 0, 5_000).optional(),
    vab: measure('volts', 0, MAX_LINE_VOLTS),
    vbc: measure('volts', 0, MAX_LINE_VOLTS).optional(),
    vca: measure('volts', 0, MAX_LINE_VOLTS).optional(),
    ia: measure('amperes', 0, 100_000).optional(),
    ib: measure('amperes', 0, 100_000).optional(),
    ic: measure('amperes', 0, 100_000).optional(),
    kw: measure('kW', -100_000, 100_000).optional(),
    statorC: measure('°C', -80, 400).optional(),
    ambientC: measure('°C', -80, 100).optional(),
    windMs: measure('m/s', 0, 150).optional(),
    airKgM3: measure('kg/m³', 0.3, 2).optional(),
    flowM3s: measure('m³/s', 0, 10_000).optional(),
    headM: measure('m', 0, 3_000).optional(),
  });
}

/** A validated sample: `ts` in epoch milliseconds, absent fields undefined. */
export type TelemetrySample = z.output<ReturnType<typeof telemetrySampleSchema>>;

const defaultSchema = telemetrySampleSchema();

/** Problems of one sample, each "field: reason". */
export type SampleProblems = readonly string[];

/** Formats zod issues as "field: reason" lines. */
export function formatIssues(issues: readonly z.core.$ZodIssue[], prefix = ''): string[] {
  return issues.map((issue) => {
    const path = issue.path.map((p) => (typeof p === 'number' ? `[${p}]` : `.${String(p)}`)).join('');
    const name = `${prefix}${path}`.replace(/^\./, '');
    return name ? `${name}: ${issue.message}` : issue.message;
  });
}

const KNOWN_FIELDS: ReadonlySet<string> = new Set(TELEMETRY_FIELDS);
/** The shared empty list of field names (never written). */
export const NO_FIELDS: string[] = Object.freeze([]) as unknown as string[];

/**
 * Validates one raw sample. Unknown fields are not kept: their names come
 * back in `unknownFields` so the caller can warn once per unit.
 * @example parseTelemetrySample({ ts: 1767225600000, rpm: 300, vab: 120 }).ok // true
 */
export function parseTelemetrySample(
  raw: unknown,
  schema: ReturnType<typeof telemetrySampleSchema> = defaultSchema,
):
  | { ok: true; sample: TelemetrySample; unknownFields: string[] }
  | { ok: false; problems: string[] } {
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw)) {
    return { ok: false, problems: [`expected a sample object, got ${describeValue(raw)}`] };
  }
  const result = schema.safeParse(raw);
  if (!result.success) return { ok: false, problems: formatIssues(result.error.issues) };
  let unknownFields: string[] = NO_FIELDS;
  for (const key in raw) {
    if (!KNOWN_FIELDS.has(key) && Object.hasOwn(raw, key)) (unknownFields === NO_FIELDS ? (unknownFields = []) : unknownFields).push(key);
  }
  return { ok: true, sample: result.data, unknownFields };
}
