'use client';
/**
 * The admin screens' forms. Each shows what happened in a polite status line
 * (or a problem beside its field), and a token or link made here once.
 */
import { useActionState, type ReactNode } from 'react';
import styles from '@/app/account/account.module.css';
import type { AdminState } from '@/app/admin/actions';

type Action = (previous: AdminState, data: FormData) => Promise<AdminState>;
type Sites = readonly { id: string; name: string }[];
/** The roles in the menu's order, each with its name in words. */
type Roles = readonly { value: string; name: string }[];

const INITIAL: AdminState = { submitted: 0 };

function Outcome({ state }: { state: AdminState }) {
  if (state.submitted === 0) return null;
  return (
    <div role="status" aria-live="polite">
      {state.error ? <p className={styles.problem}>{state.error}</p> : null}
      {state.done ? <p className={styles.done}>{state.done}</p> : null}
      {state.secret ? (
        <p>
          <code className={styles.secret} data-testid="secret">
            {state.secret}
          </code>
        </p>
      ) : null}
    </div>
  );
}

function FieldError({ state, name }: { state: AdminState; name: string }) {
  const message = state.fieldErrors?.[name];
  return message ? (
    <span className={styles.error} id={`${name}-error`}>
      {message}
    </span>
  ) : null;
}

function invalid(state: AdminState, name: string) {
  return state.fieldErrors?.[name] ? { 'aria-invalid': true as const, 'aria-describedby': `${name}-error` } : {};
}

function RoleAndSites({ state, roles, sites, role, chosen }: { state: AdminState; roles: Roles; sites: Sites; role?: string; chosen?: readonly string[] }) {
  return (
    <>
      <div className={styles.field}>
        <label htmlFor="role">Role</label>
        <span className={styles.hint} id="role-hint">
          Administrator: everything, people included. Operator: all sites, changes setup, acknowledges alerts. Crew: their sites, acknowledges alerts. Owner:
          their sites, read only.
        </span>
        <select
          id="role"
          name="role"
          defaultValue={state.values?.role ?? role ?? 'crew'}
          aria-invalid={state.fieldErrors?.role ? true : undefined}
          aria-describedby={state.fieldErrors?.role ? 'role-hint role-error' : 'role-hint'}
        >
          {roles.map((r) => (
            <option key={r.value} value={r.value}>
              {r.name}
            </option>
          ))}
        </select>
        <FieldError state={state} name="role" />
      </div>
      <fieldset className={styles.checks} {...(state.fieldErrors?.siteIds ? { 'aria-describedby': 'siteIds-error' } : {})}>
        <legend className={styles.legend}>Sites (crew and owners see only these)</legend>
        {sites.length === 0 ? <span className="note">No sites yet.</span> : null}
        {sites.map((s) => (
          <label key={s.id}>
            <input type="checkbox" name="siteIds" value={s.id} defaultChecked={chosen?.includes(s.id)} /> {s.name} <span className="unit-id muted">{s.id}</span>
          </label>
        ))}
      </fieldset>
      <FieldError state={state} name="siteIds" />
    </>
  );
}

export function AddPersonForm({ action, roles, sites }: { action: Action; roles: Roles; sites: Sites }) {
  const [state, formAction, pending] = useActionState(action, INITIAL);
  return (
    <form action={formAction} className={styles.form}>
      <Outcome state={state} />
      <div className={styles.field}>
        <label htmlFor="email">E-mail address</label>
        <input id="email" name="email" type="email" autoComplete="off" spellCheck={false} defaultValue={state.values?.email} {...invalid(state, 'email')} />
        <FieldError state={state} name="email" />
      </div>
      <RoleAndSites state={state} roles={roles} sites={sites} />
      <div className={styles.field}>
        <label htmlFor="password">First password</label>
        <input
          id="password"
          name="password"
          type="password"
          autoComplete="new-password"
          aria-invalid={state.fieldErrors?.password ? true : undefined}
          aria-describedby={state.fieldErrors?.password ? 'password-hint password-error' : 'password-hint'}
        />
        <span className={styles.hint} id="password-hint">
          At least 12 characters; common passwords are refused. They choose their own at their first sign-in.
        </span>
        <FieldError state={state} name="password" />
      </div>
      <button type="submit" className={styles.primary} disabled={pending}>
        Add person
      </button>
    </form>
  );
}

export function AccessForm({ action, roles, sites, role, chosen }: { action: Action; roles: Roles; sites: Sites; role: string; chosen: readonly string[] }) {
  const [state, formAction, pending] = useActionState(action, INITIAL);
  return (
    <form action={formAction} className={styles.form}>
      <RoleAndSites state={state} roles={roles} sites={sites} role={role} chosen={chosen} />
      <button type="submit" className={styles.primary} disabled={pending}>
        Save role and sites
      </button>
      <Outcome state={state} />
    </form>
  );
}

export function PasswordResetForm({ action }: { action: Action }) {
  const [state, formAction, pending] = useActionState(action, INITIAL);
  return (
    <form action={formAction} className={styles.form}>
      <div className={styles.field}>
        <label htmlFor="reset-password">New password</label>
        <input id="reset-password" name="password" type="password" autoComplete="new-password" {...invalid(state, 'password')} />
        <FieldError state={state} name="password" />
      </div>
      <button type="submit" className={styles.primary} disabled={pending}>
        Set password
      </button>
      <Outcome state={state} />
    </form>
  );
}

/** One button that runs an action (disable, enable, revoke). */
export function ButtonForm({ action, label, children }: { action: Action; label: string; children?: ReactNode }) {
  const [state, formAction, pending] = useActionState(action, INITIAL);
  return (
    <form action={formAction} className={styles.inline}>
      {children}
      <button type="submit" disabled={pending}>
        {label}
      </button>
      <Outcome state={state} />
    </form>
  );
}

export function NameForm({ action, label, field, hint, scopes }: { action: Action; label: string; field: string; hint: string; scopes?: readonly { value: string; label: string }[] }) {
  const [state, formAction, pending] = useActionState(action, INITIAL);
  const id = `${field}-${label.replace(/\W+/g, '-').toLowerCase()}`;
  return (
    <form action={formAction} className={styles.form}>
      {scopes ? (
        <div className={styles.field}>
          <label htmlFor={`${id}-scope`}>Shows</label>
          <select id={`${id}-scope`} name="scope" {...invalid(state, 'scope')}>
            {scopes.map((s) => (
              <option key={s.value} value={s.value}>
                {s.label}
              </option>
            ))}
          </select>
          <FieldError state={state} name="scope" />
        </div>
      ) : null}
      <div className={styles.field}>
        <label htmlFor={id}>Name</label>
        <input id={id} name="name" autoComplete="off" aria-describedby={`${id}-hint`} {...invalid(state, 'name')} />
        <span className={styles.hint} id={`${id}-hint`}>
          {hint}
        </span>
        <FieldError state={state} name="name" />
      </div>
      <button type="submit" className={styles.primary} disabled={pending}>
        {label}
      </button>
      <Outcome state={state} />
    </form>
  );
}
