'use client';
/**
 * An endpoint's "Disable" button, with its confirmation as a second button
 * (no browser dialog): disabling cannot be undone from here, and what the
 * endpoint had not received is given up.
 */
import { useActionState, useEffect, useRef, useState } from 'react';
import type { ActionState } from '@/lib/request/action';
import secretStyles from './device-credentials.module.css';
import styles from './webhooks.module.css';

type Action = (state: ActionState) => Promise<ActionState>;

export function WebhookDisable({ id, url, enabled, action }: { id: number; url: string; enabled: boolean; action: Action }) {
  const [state, formAction, pending] = useActionState(action, { submitted: 0 });
  const [confirming, setConfirming] = useState(false);
  const question = useRef<HTMLParagraphElement>(null);
  const opener = useRef<HTMLButtonElement>(null);
  const wasConfirming = useRef(false);
  const told = useRef<HTMLParagraphElement>(null);
  useEffect(() => {
    if (confirming) question.current?.focus();
    else if (wasConfirming.current) opener.current?.focus();
    wasConfirming.current = confirming;
  }, [confirming]);
  // The form is gone once the endpoint is disabled: focus lands on what was done.
  useEffect(() => {
    if (state.done) told.current?.focus();
  }, [state]);
  return (
    <div>
      {state.done ? (
        <p role="status" ref={told} tabIndex={-1}>
          {state.done}
        </p>
      ) : null}
      {state.error ? (
        <p role="alert" className={secretStyles.problem}>
          {state.error}
        </p>
      ) : null}
      {enabled && !confirming ? (
        <div className={styles.buttons}>
          <button type="button" ref={opener} onClick={() => setConfirming(true)} aria-label={`Disable endpoint ${id}`}>
            Disable…
          </button>
        </div>
      ) : null}
      {enabled && confirming ? (
        <form action={formAction} className={styles.confirm}>
          <p ref={question} tabIndex={-1}>
            Disable endpoint {id}? Nothing more is sent to <code>{url}</code>, and the messages it has not received yet are given up. It cannot be
            enabled again: add it anew for a new secret.
          </p>
          <div className={styles.buttons}>
            <button type="submit" disabled={pending}>
              {pending ? 'Disabling…' : `Yes, disable endpoint ${id}`}
            </button>
            <button type="button" onClick={() => setConfirming(false)} disabled={pending}>
              Keep it
            </button>
          </div>
        </form>
      ) : null}
    </div>
  );
}
