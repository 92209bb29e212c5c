import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { Breadcrumbs } from '@/app/_components/breadcrumbs';
import { StateBadge } from '@/app/_components/state-badge';
import { AcknowledgeForm, ShelveForm } from '@/app/alerts/_components/alert-forms';
import { AlertFacts, AlertMarks } from '@/app/alerts/_components/panels';
import { loadAlertScreen } from '@/lib/alerts/screen';
import styles from '@/app/alerts/alerts.module.css';
import { AlertHistory } from './_components/history';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Alert' };

export default async function AlertPage({ params }: { params: Promise<{ alertId: string }> }) {
  const screen = await loadAlertScreen((await params).alertId);
  if (!screen) notFound();
  const { alert } = screen;
  return (
    <>
      <Breadcrumbs trail={screen.trail} />
      <div className="page-head">
        <div>
          <h1>
            {alert.conditionName} on <span className="unit-id">{alert.unitId}</span>
          </h1>
          <p className={styles.head}>
            <StateBadge state={alert.badge} label={alert.severityName} />
            <span className={styles.stateText}>{alert.stateText}</span>
            <span>
              at <a href={alert.siteHref}>{alert.siteName}</a>
            </span>
          </p>
        </div>
      </div>

      <section className={`panel ${alert.severity === 'alarm' ? 'panel-fault' : alert.severity === 'warning' ? 'panel-warning' : ''}`} aria-labelledby="what-heading">
        <h2 id="what-heading">What is wrong</h2>
        <p>{alert.message}</p>
        <AlertFacts alert={alert} />
        <AlertMarks alert={alert} />
        <p className="caution" data-testid="safety-caution">
          {screen.caution}
        </p>
        <ul className={styles.links}>
          <li>
            <a href={screen.links.unit}>
              The unit&apos;s page: <span className="unit-id">{alert.unitId}</span>
            </a>
          </li>
          <li>
            <a href={screen.links.siteAlerts}>Every alert of {alert.siteName}</a>
          </li>
        </ul>
      </section>

      {screen.canAct && (alert.mayAcknowledge || alert.mayShelve) ? (
        <section className="panel" aria-labelledby="act-heading">
          <h2 id="act-heading">Take it</h2>
          {alert.mayAcknowledge ? <AcknowledgeForm formId="acknowledge-one" alertId={alert.id} label="Acknowledge" /> : null}
          {alert.mayShelve && alert.state !== 'shelved' ? (
            <>
              <h3>Shelve</h3>
              <ShelveForm alertId={alert.id} choices={screen.shelveChoices} timeZone={alert.timeZone} />
            </>
          ) : null}
        </section>
      ) : screen.canAct ? null : (
        <p className="note">Your role sees alerts; crews, operators and administrators acknowledge and shelve them.</p>
      )}

      <AlertHistory history={screen.history} timeZone={alert.timeZone} />
    </>
  );
}
