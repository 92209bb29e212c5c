import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { TELEMETRY_FIELDS, formatIssues, sampleObject, telemetrySampleSchema } from './telemetry';

const NOW = Date.UTC(2026, 5, 1, 12);

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

  it('parses as zod\'s own interpreter of the same schema does, issues and words included (property)', () => {
    // Reference: zod's runtime parser (the interpreter z.compile falls back to), on the schema as written.
    let accepted = 0;
    fc.assert(
      fc.property(anySample, (raw) => {
        const got = compiled.safeParse(raw);
        const want = interpreted.safeParse(raw);
        expect(got.success).toBe(want.success);
        if (want.success) accepted++;
        if (want.success) expect(got.data).toEqual(want.data);
        else expect(formatIssues(got.error!.issues)).toEqual(formatIssues(want.error.issues));
      }),
      { numRuns: 2_000 },
    );
    // Both ways are exercised: a good share of the generated samples is valid.
    expect(accepted).toBeGreaterThan(100);
  });

  it('builds a fresh sample, leaving out unknown fields', () => {
    const raw = { ts: NOW, rpm: 300, vab: 230, gearboxC: 60 };
    const got = compiled.safeParse(raw);
    expect(got.success && got.data).toEqual({ ts: NOW, rpm: 300, vab: 230 });
    expect(got.data).not.toBe(raw);
  });
});
