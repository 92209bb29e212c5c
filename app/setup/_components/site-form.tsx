'use client';
/** The site form: id (a new site), name and IANA time zone, checked by the contract's site schema. */
import { useActionState, useEffect, useRef } from 'react';
import { problemsOf, type FormState } from '@/app/setup/form-state';
import { ErrorSummary, Field } from './field';
import styles from './form.module.css';

type Action = (state: FormState, data: FormData) => Promise<FormState>;

const LABELS: Record<string, string> = { id: 'Site id', name: 'Name', timezone: 'Time zone' };

export function SiteForm({
  action,
  initial,
  editingId,
  timeZones,
  submitLabel,
}: {
  action: Action;
  initial: FormState;
  editingId?: string;
  timeZones: readonly string[];
  submitLabel: string;
}) {
  const [state, formAction, pending] = useActionState(action, initial);
  const formRef = useRef<HTMLFormElement>(null);
  const v = state.values ?? {};
  const e = problemsOf(state);
  useEffect(() => {
    if (state.submitted === 0) return;
    formRef.current?.querySelector<HTMLElement>('[aria-invalid="true"]')?.focus();
  }, [state]);

  return (
    <form ref={formRef} action={formAction} className={styles.form} key={state.submitted} noValidate>
      <ErrorSummary errors={e} labels={LABELS} />
      <fieldset className={styles.fieldset}>
        <legend>Site</legend>
        {editingId ? (
          <Field name="id" label="Site id" defaultValue={editingId} readOnly hint="devices publish under it: not changed here" />
        ) : (
          <Field name="id" label="Site id" hint="1 to 64 of a-z, 0-9 and -, such as tarn-edge" error={e.id} defaultValue={v.id ?? ''} />
        )}
        <Field name="name" label="Name" hint="as people call the place" error={e.name} defaultValue={v.name ?? ''} />
        <Field
          name="timezone"
          label="Time zone"
          hint="IANA name, such as Europe/Oslo or America/Vancouver: days and months of energy follow it"
          error={e.timezone}
          defaultValue={v.timezone ?? ''}
          list="time-zones"
        />
        <datalist id="time-zones">
          {timeZones.map((tz) => (
            <option key={tz} value={tz} />
          ))}
        </datalist>
      </fieldset>
      <div className={styles.actions}>
        <button type="submit" className={styles.primary} disabled={pending}>
          {pending ? 'Saving…' : submitLabel}
        </button>
        <a href={editingId ? `/setup/sites/${editingId}` : '/setup'}>Cancel</a>
      </div>
    </form>
  );
}
