'use client';
/**
 * "Add an endpoint" of the webhooks page: address, site or every site,
 * lowest severity. The answer shows the new endpoint's signing secret once,
 * with how a receiver checks a message; only an editor's page renders this.
 */
import { useActionState, useEffect, useRef } from 'react';
import type { AddWebhookState } from '@/app/setup/webhook-actions';
import { problemsOf } from '@/app/setup/form-state';
import { CopyButton } from './device-credentials';
import { ErrorSummary, Field, SelectField } from './field';
import formStyles from './form.module.css';
import secretStyles from './device-credentials.module.css';
import styles from './webhooks.module.css';

type Choice = { value: string; label: string };
type Action = (state: AddWebhookState, data: FormData) => Promise<AddWebhookState>;

const LABELS: Record<string, string> = { url: 'Address', siteId: 'Site', minSeverity: 'Lowest severity' };

function SecretOnce({ added }: { added: NonNullable<AddWebhookState['added']> }) {
  const ref = useRef<HTMLDivElement>(null);
  useEffect(() => ref.current?.focus(), [added]);
  return (
    <div ref={ref} className={`${secretStyles.secret} ${styles.secret}`} role="status" tabIndex={-1}>
      <p className={secretStyles.once}>
        Endpoint {added.id} added: {added.reach} go to <code>{added.url}</code>. Its signing secret, shown once: copy it into the receiving system now.
      </p>
      <div className={secretStyles.value}>
        <span>Secret</span> <code data-testid="webhook-secret">{added.secret}</code> <CopyButton text={added.secret} label="secret" />
      </div>
      <p>
        Each message is signed as the open Standard Webhooks specification says: the receiver checks the <code>webhook-signature</code> header with
        this secret (the key is the bytes after <code>whsec_</code>), best with any Standard Webhooks library, and drops a message whose{' '}
        <code>webhook-timestamp</code> is more than a few minutes old. A retry keeps the same <code>webhook-id</code>. The details are in{' '}
        <code>docs/alerts.md</code>.
      </p>
      <p>The secret is not shown again. If it is lost, add the endpoint again and disable this one.</p>
    </div>
  );
}

export function WebhookAddForm({ action, siteChoices, severityChoices, defaultSeverity }: { action: Action; siteChoices: readonly Choice[]; severityChoices: readonly Choice[]; defaultSeverity: string }) {
  const [state, formAction, pending] = useActionState(action, { submitted: 0 });
  const formRef = useRef<HTMLFormElement>(null);
  const v = state.values ?? {};
  const e = problemsOf(state);
  useEffect(() => {
    if (state.submitted === 0 || state.added) return;
    formRef.current?.querySelector<HTMLElement>('[aria-invalid="true"]')?.focus();
  }, [state]);
  return (
    <section className={styles.addSection} aria-labelledby="add-webhook-title">
      <h2 id="add-webhook-title">Add an endpoint</h2>
      <p className="note">
        Every change of an alert that reaches the endpoint is posted to it as JSON. The same as <code>npx millrace webhook add</code>.
      </p>
      {state.added ? <SecretOnce added={state.added} /> : null}
      <form ref={formRef} action={formAction} className={formStyles.form} key={state.submitted} noValidate>
        <ErrorSummary errors={e} labels={LABELS} />
        <fieldset className={formStyles.fieldset}>
          <legend>Endpoint</legend>
          <Field name="url" label="Address" wide hint="http:// or https://, such as https://hooks.example.org/millrace" error={e.url} defaultValue={v.url ?? ''} autoComplete="url" />
          <SelectField name="siteId" label="Site" hint="only this site’s alerts, or every site’s" error={e.siteId} defaultValue={v.siteId ?? ''} options={siteChoices} />
          <SelectField
            name="minSeverity"
            label="Lowest severity"
            hint="alerts below it are not sent"
            error={e.minSeverity}
            defaultValue={v.minSeverity ?? defaultSeverity}
            options={severityChoices}
          />
        </fieldset>
        <div className={formStyles.actions}>
          <button type="submit" className={formStyles.primary} disabled={pending}>
            {pending ? 'Adding…' : 'Add endpoint'}
          </button>
        </div>
      </form>
    </section>
  );
}
