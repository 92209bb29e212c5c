'use client';
import { useActionState } from 'react';
import type { ActionState } from '@/lib/request/action';
import styles from '@/app/account/account.module.css';
import { changePasswordAction } from '@/app/account/actions';

const INITIAL: ActionState = { submitted: 0 };

function Problem({ message, id }: { message?: string; id: string }) {
  return message ? (
    <span className={styles.error} id={id}>
      {message}
    </span>
  ) : null;
}

/** Current password, the new one twice; password managers may generate and fill it. */
export function PasswordChangeForm({ next }: { next: string }) {
  const [state, action, pending] = useActionState(changePasswordAction, INITIAL);
  const e = state.fieldErrors ?? {};
  const attrs = (name: string) => (e[name] ? { 'aria-invalid': true as const, 'aria-describedby': `${name}-error` } : {});
  return (
    <form action={action} className={styles.form}>
      <input type="hidden" name="next" value={next} />
      {state.error ? (
        <p className={styles.problem} role="alert">
          {state.error}
        </p>
      ) : null}
      <div className={styles.field}>
        <label htmlFor="current">Current password</label>
        <input id="current" name="current" type="password" autoComplete="current-password" {...attrs('current')} />
        <Problem message={e.current} id="current-error" />
      </div>
      <div className={styles.field}>
        <label htmlFor="password">New password</label>
        <input
          id="password"
          name="password"
          type="password"
          autoComplete="new-password"
          aria-invalid={e.password ? true : undefined}
          aria-describedby={e.password ? 'password-hint password-error' : 'password-hint'}
        />
        <span className={styles.hint} id="password-hint">
          At least 12 characters, no other rules. Common passwords are refused; a few unrelated words work well.
        </span>
        <Problem message={e.password} id="password-error" />
      </div>
      <div className={styles.field}>
        <label htmlFor="again">New password again</label>
        <input id="again" name="again" type="password" autoComplete="new-password" {...attrs('again')} />
        <Problem message={e.again} id="again-error" />
      </div>
      <button type="submit" className={styles.primary} disabled={pending}>
        Change password
      </button>
    </form>
  );
}
