'use client';
/**
 * The alert forms: acknowledge (the list's ticked alerts, or one alert) with
 * an optional note, and shelve one alert with a reason and an end. Each says
 * what happened in a polite status line and names a problem beside its field.
 */
import { useActionState, useMemo, useState } from 'react';
import { acknowledgeAlertsAction, shelveAlertAction } from '@/app/alerts/actions';
import type { ActionState } from '@/lib/request/action';
import styles from '@/app/alerts/alerts.module.css';

const INITIAL: ActionState = { submitted: 0 };
const NOTE_MAX = 500;

function Outcome({ state }: { state: ActionState }) {
  return (
    <div role="status" aria-live="polite">
      {state.submitted > 0 && state.error ? <p className={styles.problem}>{state.error}</p> : null}
      {state.submitted > 0 && state.done ? <p className={styles.done}>{state.done}</p> : null}
    </div>
  );
}

function FieldError({ id, message }: { id: string; message: string | undefined }) {
  return message ? (
    <span id={id} className={styles.error}>
      {message}
    </span>
  ) : null;
}

function described(...ids: Array<string | false | undefined>): string | undefined {
  return ids.filter(Boolean).join(' ') || undefined;
}

/**
 * Acknowledge with a note. `formId` lets the list's checkboxes (`form={formId}`, name `alertId`)
 * belong to it from their cards; `alertId` makes it the form of one alert.
 */
export function AcknowledgeForm({ formId, alertId, label, disabled = false }: { formId: string; alertId?: string; label: string; disabled?: boolean }) {
  const [state, formAction, pending] = useActionState(acknowledgeAlertsAction, INITIAL);
  const noteId = `${formId}-note`;
  const noteError = state.fieldErrors?.note;
  const idsError = state.fieldErrors?.alertId;
  return (
    <form id={formId} action={formAction} className={styles.form} aria-label={label}>
      {alertId ? <input type="hidden" name="alertId" value={alertId} /> : null}
      <div className={styles.field}>
        <label htmlFor={noteId}>
          Note <span className="muted">(optional)</span>
        </label>
        <textarea
          id={noteId}
          name="note"
          maxLength={NOTE_MAX}
          defaultValue={state.values?.note}
          aria-invalid={noteError ? true : undefined}
          aria-describedby={described(`${noteId}-hint`, noteError && `${noteId}-error`)}
        />
        <span id={`${noteId}-hint`} className={styles.hint}>
          What you did or will do; up to {NOTE_MAX} characters. Everyone who sees the alert reads it.
        </span>
        <FieldError id={`${noteId}-error`} message={noteError} />
      </div>
      <FieldError id={`${formId}-ids-error`} message={idsError} />
      <button type="submit" className={styles.primary} disabled={pending || disabled}>
        {label}
      </button>
      <Outcome state={state} />
    </form>
  );
}

/** Shelve one alert: a reason, and for how long (a span, or until a time on the site's clock). */
export function ShelveForm({ alertId, choices, timeZone }: { alertId: string; choices: ReadonlyArray<{ value: string; label: string }>; timeZone: string }) {
  const shelve = useMemo(() => shelveAlertAction.bind(null, Number(alertId)), [alertId]);
  const [state, formAction, pending] = useActionState(shelve, INITIAL);
  const [span, setSpan] = useState(state.values?.for ?? '8h');
  const id = (name: string) => `shelve-${alertId}-${name}`;
  const errors = state.fieldErrors ?? {};
  return (
    <form action={formAction} className={styles.form} aria-label="Shelve this alert">
      <div className={styles.field}>
        <label htmlFor={id('reason')}>Reason</label>
        <input
          id={id('reason')}
          name="reason"
          maxLength={NOTE_MAX}
          required
          defaultValue={state.values?.reason}
          aria-invalid={errors.reason ? true : undefined}
          aria-describedby={described(id('reason-hint'), errors.reason && id('reason-error'))}
        />
        <span id={id('reason-hint')} className={styles.hint}>
          Why it may be hidden, such as planned work on the unit. It is still evaluated and logged while shelved.
        </span>
        <FieldError id={id('reason-error')} message={errors.reason} />
      </div>
      <fieldset className={styles.choices} aria-describedby={errors.for ? id('for-error') : undefined}>
        <legend className={styles.legend}>Shelve for</legend>
        {choices.map((c) => (
          <label key={c.value}>
            <input type="radio" name="for" value={c.value} checked={span === c.value} onChange={() => setSpan(c.value)} /> {c.label}
          </label>
        ))}
      </fieldset>
      <FieldError id={id('for-error')} message={errors.for} />
      {span === 'until' ? (
        <div className={styles.field}>
          <label htmlFor={id('until')}>Until (site time, {timeZone})</label>
          <input
            id={id('until')}
            name="until"
            type="datetime-local"
            required
            defaultValue={state.values?.until}
            aria-invalid={errors.until ? true : undefined}
            aria-describedby={described(id('until-hint'), errors.until && id('until-error'))}
          />
          <span id={id('until-hint')} className={styles.hint}>
            In the future, at most 30 days from now.
          </span>
          <FieldError id={id('until-error')} message={errors.until} />
        </div>
      ) : null}
      <button type="submit" className={styles.primary} disabled={pending}>
        Shelve
      </button>
      <Outcome state={state} />
    </form>
  );
}
