import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { TELEMETRY_FIELDS, formatIssues, sampleObject, telemetrySampleSchema, type ValueField } from './telemetry';

const NOW = Date.UTC(2026, 5, 1, 12);

/**
 * The validation rules worked out by hand for the inputs generated below,
 * independent of zod: contract section 1 (required ts, rpm and vab; negative,
 * NaN and infinite values, volts above 10 kV, times before 2000 or more than
 * 5 minutes ahead refused) with the bounds and words the schema states for
 * the rest. A refused sample's issues come from zod's interpreter whichever
 * parser ran, so comparing compiled with interpreted could not fail for them:
 * they are checked against this instead.
 */
const RULES: Record<ValueField, readonly [what: string, min: number, max: number, required: boolean]> = {
  rpm: ['rev/min', 0, 100_000, true],
  hz: ['hertz', 0, 5_000, false],
  vab: ['volts', 0, 10_000, true],
  vbc: ['volts', 0, 10_000, false],
  vca: ['volts', 0, 10_000, false],
  ia: ['amperes', 0, 100_000, false],
  ib: ['amperes', 0, 100_000, false],
  ic: ['amperes', 0, 100_000, false],
  kw: ['kW', -100_000, 100_000, false],
  statorC: ['°C', -80, 400, false],
  ambientC: ['°C', -80, 100, false],
  windMs: ['m/s', 0, 150, false],
  airKgM3: ['kg/m³', 0.3, 2, false],
  flowM3s: ['m³/s', 0, 10_000, false],
  headM: ['m', 0, 3_000, false],
};
/** The time strings the generator below offers, read by hand: epoch ms, or undefined when malformed. */
const TS_STRINGS: Record<string, number | undefined> = {
  '2026-06-01T11:59:00Z': Date.UTC(2026, 5, 1, 11, 59),
  '2026-06-01T11:59:00.123+02:00': Date.UTC(2026, 5, 1, 9, 59, 0, 123),
  '2026-06-01 11:59': undefined,
  '1780315140000': 1_780_315_140_000,
  soon: undefined,
};
const shown = (v: unknown): string =>
  v === undefined ? 'nothing' : typeof v === 'string' ? JSON.stringify(v) : Array.isArray(v) ? 'a list' : v !== null && typeof v === 'object' ? 'an object' : String(v);

/** Expected problems ("field: reason", in field order) and, when there are none, the expected sample. */
function expectedOutcome(raw: Record<string, unknown>): { problems: string[]; sample?: Record<string, number> } {
  const problems: string[] = [];
  const sample: Record<string, number> = {};
  const ts = raw.ts;
  const ms = typeof ts === 'number' ? (Number.isFinite(ts) ? ts : undefined) : typeof ts === 'string' ? TS_STRINGS[ts] : undefined;
  if (ms === undefined) problems.push(`ts: expected an ISO-8601 time with offset or epoch milliseconds, got ${shown(ts)}`);
  else if (ms < Date.UTC(2000, 0, 1)) problems.push(`ts: ${new Date(ms).toISOString()} is before 2000`);
  else if (ms > NOW + 5 * 60_000) problems.push(`ts: ${new Date(ms).toISOString()} is more than 5 minutes in the future`);
  else sample.ts = ms;
  for (const [field, [what, min, max, required]] of Object.entries(RULES)) {
    const v = raw[field];
    if (v === undefined && !required) continue;
    if (typeof v !== 'number' || !Number.isFinite(v)) problems.push(`${field}: expected a number of ${what}, got ${shown(v)}`);
    else if (v < min) problems.push(`${field}: ${String(v)} ${what} is below ${min}, outside physical sense`);
    else if (v > max) problems.push(`${field}: ${String(v)} ${what} is above ${max}, outside physical sense`);
    else sample[field] = v;
  }
  return problems.length > 0 ? { problems } : { problems, sample };
}

/** Anything a device might put in a field: good values, bounds, wrong types. */
const anyValue = fc.oneof(
  { arbitrary: fc.double({ min: 0.3, max: 2, noNaN: true }), weight: 12 },
  fc.double({ min: -1e6, max: 1e6, noNaN: true }),
  fc.constantFrom(0, -0, 0.3, 2, 5_000, 10_000, 10_000.5, 100_000, -80, 400, Number.NaN, Infinity, -Infinity),
  fc.constantFrom('abc', '', '12', null, true, [], {}, undefined),
);
const anyTs = fc.oneof(
  { arbitrary: fc.integer({ min: NOW - 86_400_000, max: NOW }), weight: 6 },
  fc.integer({ min: Date.UTC(1999, 0, 1), max: NOW + 3_600_000 }),
  fc.integer({ min: NOW + 4 * 60_000, max: NOW + 6 * 60_000 }),
  fc.constantFrom('2026-06-01T11:59:00Z', '2026-06-01T11:59:00.123+02:00', '2026-06-01 11:59', '1780315140000', 'soon', null),
  fc.constant(undefined),
);
const anySample = fc.record(
  {
    ts: anyTs,
    ...Object.fromEntries(TELEMETRY_FIELDS.filter((f) => f !== 'ts').map((f) => [f, anyValue])),
    gearboxC: anyValue,
  },
  { requiredKeys: [] },
);

describe('the sample schema, compiled', () => {
  const compiled = telemetrySampleSchema(() => NOW);
  const interpreted = sampleObject(() => NOW);

  it('accepts and refuses as the rules worked by hand say, issues and words included (property)', () => {
    let accepted = 0;
    let refused = 0;
    fc.assert(
      fc.property(anySample, (raw) => {
        const got = compiled.safeParse(raw);
        const want = expectedOutcome(raw);
        expect(got.success).toBe(want.problems.length === 0);
        if (got.success) {
          accepted++;
          expect(got.data).toEqual(want.sample);
          // Accepted samples take the compiled path: the same output as zod's interpreter.
          expect(got.data).toEqual(interpreted.parse(raw));
        } else {
          refused++;
          expect(formatIssues(got.error.issues)).toEqual(want.problems);
        }
      }),
      { numRuns: 2_000 },
    );
    // Both ways are exercised: a good share of the generated samples is valid, and of them refused.
    expect(accepted).toBeGreaterThan(100);
    expect(refused).toBeGreaterThan(100);
  });

  it('names every field of a refused sample with its reason (fixed cases)', () => {
    const got = compiled.safeParse({ ts: '2026-06-01T12:06:00Z', rpm: -1, vab: 10_001, hz: Number.NaN, statorC: 'hot', kw: null });
    expect(got.success).toBe(false);
    expect(formatIssues(got.error!.issues)).toEqual([
      'ts: 2026-06-01T12:06:00.000Z is more than 5 minutes in the future',
      'rpm: -1 rev/min is below 0, outside physical sense',
      'hz: expected a number of hertz, got NaN',
      'vab: 10001 volts is above 10000, outside physical sense',
      'kw: expected a number of kW, got null',
      'statorC: expected a number of °C, got "hot"',
    ]);
    expect(formatIssues(compiled.safeParse({ ts: Date.UTC(1999, 11, 31, 23, 59) }).error!.issues)).toEqual([
      'ts: 1999-12-31T23:59:00.000Z is before 2000',
      'rpm: expected a number of rev/min, got nothing',
      'vab: expected a number of volts, got nothing',
    ]);
  });

  it('builds a fresh sample, leaving out unknown fields', () => {
    const raw = { ts: NOW, rpm: 300, vab: 230, gearboxC: 60 };
    const got = compiled.safeParse(raw);
    expect(got.success && got.data).toEqual({ ts: NOW, rpm: 300, vab: 230 });
    expect(got.data).not.toBe(raw);
  });
});
