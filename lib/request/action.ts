/**
 * The one shape of a server action: resolve the viewer, check the role, parse
 * the bound arguments and the form, and answer problems as form state (by
 * field) instead of throwing. Every action under app/ is made with `action()`:
 *
 *   export const saveSiteAction = action(
 *     { allow: canEditSetup, bound: z.tuple([slug.optional()]), input: siteFromForm },
 *     async ({ db, viewer, input, bound: [siteId] }) => { … return { submitted, … } },
 *   );
 *
 * A caller the role does not allow gets `{ error: refused }` and nothing is
 * parsed or written; nobody signed in is sent to sign in (requestContext).
 */
import { z } from 'zod';
import type { DatabaseHandle, Db } from '@/db/client';
import type { Viewer } from '@/lib/auth/viewer';
import { databaseOnly, requestContext } from '@/lib/request/context';
import { formValues } from '@/lib/request/form-values';

/** What a form shows after a submission. Every action's state has these; an area may add its own optional fields. */
export interface ActionState {
  /** Counts submissions, so a form re-mounts with the values typed and focuses the first problem. */
  submitted: number;
  /** The values as typed, to fill the form again. */
  values?: Record<string, string>;
  /** Problems by form field name. */
  fieldErrors?: Record<string, string>;
  /** A problem of the form as a whole (not allowed, gone meanwhile). */
  error?: string;
  /** What was done, in words. */
  done?: string;
}

/** The outcome of parsing a form: the value, or problems by field. */
export type Parsed<T> = { ok: true; value: T } | { ok: false; fieldErrors: Record<string, string> };

/** The words for a caller whose role may not do this. */
export const NOT_ALLOWED = 'Your role may not change this: ask an administrator.';

export interface ActionOptions<Input, Bound extends readonly unknown[]> {
  /** Who may call it; checked before anything is parsed or read. */
  allow: (viewer: Viewer) => boolean;
  /** The words for a caller who may not (default NOT_ALLOWED). */
  refused?: string;
  /**
   * The arguments the page binds (ids), parsed: they come from our own pages, but a posted
   * action can carry anything. A bad one answers `badBound` like a record that does not exist.
   */
  bound?: z.ZodType<Bound>;
  badBound?: string;
  /** The form: a zod schema (problems by the field of their first path segment) or a parse function. */
  input?: z.ZodType<Input> | ((values: Record<string, string>, bound: Bound, data: FormData) => Parsed<Input>);
}

export interface ActionContext<Input, Bound extends readonly unknown[]> {
  readonly db: Db;
  readonly handle: DatabaseHandle;
  readonly viewer: Viewer;
  readonly nowMs: number;
  readonly input: Input;
  readonly bound: Bound;
  /** The form as sent (files included), for what the schema does not carry. */
  readonly data: FormData;
  /** The form's text values as typed. */
  readonly values: Record<string, string>;
  /** This submission's number, for the state returned. */
  readonly submitted: number;
}


/** Zod's issues as one message a field, keyed by the first segment of each path (`_form` for none). */
export function fieldErrorsOf(error: z.ZodError): Record<string, string> {
  const out: Record<string, string> = {};
  for (const issue of error.issues) out[String(issue.path[0] ?? '_form')] ??= issue.message;
  return out;
}

function parseInput<Input, Bound extends readonly unknown[]>(
  input: ActionOptions<Input, Bound>['input'],
  values: Record<string, string>,
  bound: Bound,
  data: FormData,
): Parsed<Input> {
  if (input === undefined) return { ok: true, value: undefined as Input };
  if (typeof input === 'function') return input(values, bound, data);
  const parsed = input.safeParse(values);
  return parsed.success ? { ok: true, value: parsed.data } : { ok: false, fieldErrors: fieldErrorsOf(parsed.error) };
}

/**
 * Makes a server action: `(…bound, previous, formData?) => state`. The handler runs only for
 * an allowed viewer with a parsed form; problems come back as state, the values as typed with them.
 */
export function action<State extends ActionState, Input = undefined, Bound extends readonly unknown[] = []>(
  options: ActionOptions<Input, Bound>,
  handler: (context: ActionContext<Input, Bound>) => Promise<State>,
): (...args: [...Bound, State] | [...Bound, State, FormData]) => Promise<State> {
  const boundCount = options.bound instanceof z.ZodTuple ? options.bound.def.items.length : 0;
  return async (...args) => {
    const rawBound = args.slice(0, boundCount);
    const previous = (args[boundCount] ?? { submitted: 0 }) as State;
    const sent = args[boundCount + 1];
    const data = sent instanceof FormData ? sent : new FormData();
    const submitted = (previous.submitted ?? 0) + 1;
    const { db, handle, viewer, nowMs } = await requestContext();
    if (!options.allow(viewer)) return { submitted, error: options.refused ?? NOT_ALLOWED } as State;
    const bound = options.bound ? options.bound.safeParse(rawBound) : { success: true as const, data: [] as unknown as Bound };
    if (!bound.success) return { submitted, error: options.badBound ?? 'That record does not exist.' } as State;
    const values = formValues(data);
    const parsed = parseInput(options.input, values, bound.data, data);
    if (!parsed.ok) return { submitted, values, fieldErrors: parsed.fieldErrors } as State;
    return handler({ db, handle, viewer, nowMs, input: parsed.value, bound: bound.data, data, values, submitted });
  };
}

/** Anyone signed in (the role is checked by the handler's own rule, or there is none). */
export const anyone = (): boolean => true;

export interface PublicActionContext<Input> {
  readonly db: Db;
  readonly handle: DatabaseHandle;
  readonly input: Input;
  readonly data: FormData;
  readonly values: Record<string, string>;
  readonly submitted: number;
}

/**
 * An action open to anyone, signed in or not (signing in, signing out): no viewer is resolved,
 * so nobody is sent to sign in; the form is parsed as for `action()`.
 */
export function publicAction<State extends ActionState, Input = undefined>(
  options: Pick<ActionOptions<Input, []>, 'input'>,
  handler: (context: PublicActionContext<Input>) => Promise<State>,
): (...args: [] | [State] | [State, FormData]) => Promise<State> {
  return async (...args) => {
    const previous = (args[0] ?? { submitted: 0 }) as State;
    const data = args[1] instanceof FormData ? args[1] : new FormData();
    const submitted = (previous.submitted ?? 0) + 1;
    const { db, handle } = await databaseOnly();
    const values = formValues(data);
    const parsed = parseInput(options.input, values, [], data);
    if (!parsed.ok) return { submitted, values, fieldErrors: parsed.fieldErrors } as State;
    return handler({ db, handle, input: parsed.value, data, values, submitted });
  };
}
