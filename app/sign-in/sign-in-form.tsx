'use client';
import { useActionState, useEffect, useRef } from 'react';
import styles from '@/app/account/account.module.css';
import { signInAction } from './actions';
import { initialSignInState } from './state';

/** E-mail and password; password managers fill it (autocomplete), paste works. */
export function SignInForm({ next }: { next: string }) {
  const [state, action, pending] = useActionState(signInAction, initialSignInState);
  const email = useRef<HTMLInputElement>(null);
  const password = useRef<HTMLInputElement>(null);
  const message = useRef<HTMLDivElement>(null);
  useEffect(() => {
    if (state.submitted === 0) return;
    if (state.field === 'email') email.current?.focus();
    else if (state.field === 'password') password.current?.focus();
    else message.current?.focus();
  }, [state]);
  return (
    <form action={action} className={styles.form} noValidate>
      <input type="hidden" name="next" value={next} />
      {state.error ? (
        <div ref={message} tabIndex={-1} role="alert" className={styles.problem} id="sign-in-problem">
          {state.error}
        </div>
      ) : null}
      <div className={styles.field}>
        <label htmlFor="email">E-mail address</label>
        <input
          ref={email}
          id="email"
          name="email"
          type="email"
          autoComplete="username"
          inputMode="email"
          spellCheck={false}
          autoCapitalize="none"
          required
          defaultValue={state.email ?? ''}
          aria-invalid={state.field === 'email' ? true : undefined}
          aria-describedby={state.error ? 'sign-in-problem' : undefined}
        />
      </div>
      <div className={styles.field}>
        <label htmlFor="password">Password</label>
        <input
          ref={password}
          id="password"
          name="password"
          type="password"
          autoComplete="current-password"
          required
          aria-invalid={state.field === 'password' ? true : undefined}
          aria-describedby={state.error ? 'sign-in-problem' : undefined}
        />
      </div>
      <button type="submit" className={styles.primary} disabled={pending}>
        {pending ? 'Signing in…' : 'Sign in'}
      </button>
    </form>
  );
}
