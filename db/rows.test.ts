/** Raw SQL rows parsed by the schema beside their statement, from either driver's shape. */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { isAppError } from '@/lib/errors/app-error';
import { dbJson, dbNumber, dbNumberOrNull, parseRows, rowsOf } from './rows';

const schema = z.object({ key: dbNumber, kw: dbNumberOrNull, limits: dbJson(z.object({ keAlarmRatio: z.number() }).nullable()) });

describe('rows', () => {
  it('reads postgres-js arrays and PGlite { rows } alike', () => {
    expect(rowsOf([{ a: 1 }])).toEqual([{ a: 1 }]);
    expect(rowsOf({ rows: [{ a: 1 }] })).toEqual([{ a: 1 }]);
    expect(rowsOf({})).toEqual([]);
  });

  it('turns bigint and numeric text into numbers and jsonb text into JSON', () => {
    expect(parseRows('t', schema, [{ key: '42', kw: '1.5', limits: '{"keAlarmRatio":0.93}' }])).toEqual([{ key: 42, kw: 1.5, limits: { keAlarmRatio: 0.93 } }]);
    expect(parseRows('t', schema, { rows: [{ key: 7, kw: null, limits: null }] })).toEqual([{ key: 7, kw: null, limits: null }]);
  });

  it('fails naming the statement, the row and the column when a row does not fit', () => {
    try {
      parseRows('latest units', schema, [{ key: 1, kw: 2, limits: null }, { key: 'x', kw: 2, limits: null }]);
      expect.unreachable();
    } catch (error) {
      expect(isAppError(error, 'internal')).toBe(true);
      expect((error as Error).message).toMatch(/^latest units: row 2, column key: /);
    }
    expect(() => parseRows('t', schema, [{ key: 1, limits: null }])).toThrow(/row 1, column kw/);
  });

  it('the compiled parser accepts exactly what the interpreter accepts, with the same values (zod itself as the reference)', () => {
    const cell = fc.oneof(fc.double({ noNaN: true }), fc.integer().map(String), fc.constant('1.5e3'), fc.constant('x'), fc.constant(null), fc.constant('{"keAlarmRatio":0.9}'), fc.constant('{"keAlarmRatio":"no"}'));
    fc.assert(
      fc.property(fc.record({ key: cell, kw: cell, limits: cell }), (row) => {
        const interpreted = schema.safeParse(row);
        let compiled: unknown[] | undefined;
        try {
          compiled = parseRows('t', schema, [row]);
        } catch {
          compiled = undefined;
        }
        expect(compiled !== undefined).toBe(interpreted.success);
        if (interpreted.success) expect(compiled).toEqual([interpreted.data]);
      }),
      { numRuns: 500 },
    );
  });
});
