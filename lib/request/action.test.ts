/**
 * The one server-action wrapper: the role is checked before anything is
 * parsed or written, bound ids and the form are parsed with zod, problems
 * come back as form state by field with the values as typed, and nobody
 * signed in never reaches the handler.
 */
import { beforeEach, describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import type { Viewer } from '@/lib/auth/viewer';
import type { ActionState } from './action';

const state = vi.hoisted(() => ({ viewer: undefined as Viewer | undefined }));
vi.mock('@/lib/request/context', () => ({
  requestContext: async () => {
    if (!state.viewer) throw new Error('REDIRECT /sign-in');
    return { db: {}, handle: {}, viewer: state.viewer, nowMs: 1 };
  },
  databaseOnly: async () => ({ db: {}, handle: {} }),
}));

const { action, fieldErrorsOf, NOT_ALLOWED, publicAction } = await import('./action');

const operator: Viewer = { id: 'person:1', role: 'operator', siteIds: 'all', personId: 1, via: 'session' };
const crew: Viewer = { id: 'person:2', role: 'crew', siteIds: ['a'], personId: 2, via: 'session' };
const canEdit = (v: Viewer) => v.role === 'admin' || v.role === 'operator';

function form(values: Record<string, string>): FormData {
  const data = new FormData();
  for (const [k, v] of Object.entries(values)) data.append(k, v);
  return data;
}

describe('action()', () => {
  const handler = vi.fn(async ({ input, bound, submitted }: { input: { name: string; count: number }; bound: [string]; submitted: number }): Promise<ActionState> => ({
    submitted,
    done: `${bound[0]}: ${input.name} × ${input.count}`,
  }));
  const save = action(
    { allow: canEdit, bound: z.tuple([z.string().regex(/^[a-z]+$/)]), input: z.object({ name: z.string().min(1, 'Name it.'), count: z.coerce.number().int('a whole number') }) },
    handler,
  );
  beforeEach(() => {
    handler.mockClear();
  });

  it('runs the handler for an allowed viewer with the parsed form and bound ids, counting submissions', async () => {
    state.viewer = operator;
    expect(await save('north', { submitted: 2 }, form({ name: 'weir', count: '3' }))).toEqual({ submitted: 3, done: 'north: weir × 3' });
  });

  it('refuses a role it does not allow before parsing or running anything', async () => {
    state.viewer = crew;
    expect(await save('north', { submitted: 0 }, form({ name: '', count: 'x' }))).toEqual({ submitted: 1, error: NOT_ALLOWED });
    expect(handler).not.toHaveBeenCalled();
  });

  it('answers problems by field with the values as typed, and never runs the handler', async () => {
    state.viewer = operator;
    const out = await save('north', { submitted: 0 }, form({ name: '', count: '2.5' }));
    expect(out).toEqual({ submitted: 1, values: { name: '', count: '2.5' }, fieldErrors: { name: 'Name it.', count: 'a whole number' } });
    expect(handler).not.toHaveBeenCalled();
  });

  it('treats a forged bound id like a record that does not exist', async () => {
    state.viewer = operator;
    expect(await save('../etc', { submitted: 0 }, form({ name: 'weir', count: '1' }))).toEqual({ submitted: 1, error: 'That record does not exist.' });
    expect(handler).not.toHaveBeenCalled();
  });

  it('sends nobody signed in away before the handler (requestContext redirects)', async () => {
    state.viewer = undefined;
    await expect(save('north', { submitted: 0 }, form({ name: 'weir', count: '1' }))).rejects.toThrow('REDIRECT /sign-in');
    expect(handler).not.toHaveBeenCalled();
  });

  it('takes a parse function instead of a schema, and an action without a form', async () => {
    state.viewer = operator;
    const parsed = action({ allow: canEdit, input: (values) => (values.x === 'ok' ? { ok: true, value: 1 } : { ok: false, fieldErrors: { x: 'not ok' } }) }, async ({ input, submitted }): Promise<ActionState> => ({ submitted, done: String(input) }));
    expect(await parsed({ submitted: 0 }, form({ x: 'ok' }))).toEqual({ submitted: 1, done: '1' });
    expect(await parsed({ submitted: 0 }, form({ x: 'no' }))).toEqual({ submitted: 1, values: { x: 'no' }, fieldErrors: { x: 'not ok' } });
    expect(await parsed({ submitted: 0 })).toEqual({ submitted: 1, values: {}, fieldErrors: { x: 'not ok' } });
  });

  it('leaves files and Next’s own fields out of the values', async () => {
    state.viewer = operator;
    const seen = action({ allow: canEdit }, async ({ values, submitted }): Promise<ActionState> => ({ submitted, done: JSON.stringify(values) }));
    const data = form({ a: '1', $ACTION_ID_x: 'y' });
    data.append('file', new File(['x'], 'f.json'));
    expect((await seen({ submitted: 0 }, data)).done).toBe('{"a":"1"}');
  });
});

describe('publicAction()', () => {
  it('needs nobody signed in and still parses the form', async () => {
    state.viewer = undefined;
    const open = publicAction({ input: z.object({ email: z.string().min(1, 'Enter your e-mail address.') }) }, async ({ input, submitted }): Promise<ActionState> => ({ submitted, done: input.email }));
    expect(await open({ submitted: 0 }, form({ email: 'a@b.invalid' }))).toEqual({ submitted: 1, done: 'a@b.invalid' });
    expect(await open({ submitted: 4 }, form({ email: '' }))).toEqual({ submitted: 5, values: { email: '' }, fieldErrors: { email: 'Enter your e-mail address.' } });
  });
});

describe('fieldErrorsOf', () => {
  it('keeps the first message of each field, by the first segment of its path', () => {
    const r = z.object({ a: z.object({ b: z.number() }), c: z.string().min(2, 'short').regex(/x/, 'no x') }).safeParse({ a: { b: 'q' }, c: 'y' });
    expect(r.success).toBe(false);
    if (!r.success) expect(Object.keys(fieldErrorsOf(r.error))).toEqual(['a', 'c']);
    if (!r.success) expect(fieldErrorsOf(r.error).c).toBe('short');
  });
});
