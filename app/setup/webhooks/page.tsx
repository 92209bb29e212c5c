import type { Metadata } from 'next';
import { loadWebhooksScreen, type WebhookEndpointRow } from '@/lib/setup/webhooks-screen';
import { addWebhookEndpointAction, disableWebhookEndpointAction } from '@/app/setup/webhook-actions';
import { Breadcrumbs } from '@/app/_components/breadcrumbs';
import { WebhookAddForm } from '@/app/setup/_components/webhook-add-form';
import { WebhookDisable } from '@/app/setup/_components/webhook-disable';
import styles from '@/app/setup/_components/webhooks.module.css';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Webhooks · Setup' };

function Endpoint({ e }: { e: WebhookEndpointRow }) {
  return (
    <li className={`panel ${styles.endpoint}`} aria-labelledby={`webhook-${e.id}`}>
      <h3 id={`webhook-${e.id}`} className={styles.address}>
        <span className="muted">{e.id} · </span>
        {e.url}
      </h3>
      <dl className={styles.facts}>
        <dt>Site</dt>
        <dd>{e.siteLabel}</dd>
        <dt>Lowest severity</dt>
        <dd>{e.severityLabel}</dd>
        <dt>State</dt>
        <dd className={e.enabled ? undefined : styles.disabled}>{e.stateLabel}</dd>
        <dt>Messages</dt>
        <dd>
          {e.countLabels.queued}, {e.countLabels.delivered}, <span className={e.givenUp > 0 ? styles.givenUp : undefined}>{e.countLabels.givenUp}</span>
        </dd>
        <dt>Added</dt>
        <dd>
          <time dateTime={e.createdAt}>{e.createdAtLabel}</time> by {e.createdBy}
        </dd>
      </dl>
      <WebhookDisable id={e.id} url={e.url} enabled={e.enabled} action={disableWebhookEndpointAction.bind(null, e.id)} />
    </li>
  );
}

export default async function WebhooksPage() {
  const screen = await loadWebhooksScreen();
  return (
    <>
      <Breadcrumbs trail={[{ label: 'Setup', href: '/setup' }, { label: 'Webhooks' }]} />
      <h1>Webhooks</h1>
      <p className="note">Addresses that each change of an alert is posted to, signed so that the receiver can tell the message is from here.</p>
      {!screen.editable ? (
        <p className="note">Only an administrator or operator may see and manage the webhook endpoints.</p>
      ) : (
        <>
          <section aria-labelledby="webhook-list-title">
            <h2 id="webhook-list-title">Endpoints</h2>
            {screen.endpoints.length === 0 ? (
              <p>No endpoints yet: alerts are shown here but sent nowhere.</p>
            ) : (
              <ul className={styles.list}>
                {screen.endpoints.map((e) => (
                  <Endpoint key={e.id} e={e} />
                ))}
              </ul>
            )}
          </section>
          <WebhookAddForm
            action={addWebhookEndpointAction}
            siteChoices={screen.siteChoices}
            severityChoices={screen.severityChoices}
            defaultSeverity={screen.defaultSeverity}
          />
        </>
      )}
    </>
  );
}
