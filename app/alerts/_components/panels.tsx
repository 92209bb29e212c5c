/** The alert list's panels: the filter, one alert as a card, the list with its bulk acknowledgement. */
import { LocalTime } from '@/app/_components/local-time';
import { StateBadge } from '@/app/_components/state-badge';
import type { AlertRowView, AlertsScreen } from '@/lib/alerts/screen';
import { AcknowledgeForm, ShelveForm } from './alert-forms';
import styles from '@/app/alerts/alerts.module.css';

/** The list's bulk form: the cards' checkboxes belong to it. */
export const BULK_FORM_ID = 'acknowledge-selected';

/** Site, severity, state and condition to filter by (a GET form: the address holds the filter). */
export function AlertFilter({ query, options, filtered }: Pick<AlertsScreen, 'query' | 'options' | 'filtered'>) {
  const select = (name: 'site' | 'severity' | 'state' | 'condition', label: string, all: string | undefined, list: AlertsScreen['options']['sites']) => (
    <label>
      {label}
      <select name={name} defaultValue={query[name] ?? ''}>
        {all ? <option value="">{all}</option> : null}
        {list.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </label>
  );
  return (
    <form method="get" action="/alerts" className={styles.filters} aria-label="Filter">
      {query.unit ? <input type="hidden" name="unit" value={query.unit} /> : null}
      {select('site', 'Site', 'All your sites', options.sites)}
      {select('severity', 'Severity', 'Any severity', options.severities)}
      {select('state', 'State', undefined, options.states)}
      {select('condition', 'Condition', 'Any condition', options.conditions)}
      <button type="submit">Show</button>
      {filtered ? <a href="/alerts">Clear filter</a> : null}
    </form>
  );
}

/** The facts of one alert: reading and limit, times, who took it, the shelf. */
export function AlertFacts({ alert }: { alert: AlertRowView }) {
  const tz = alert.timeZone;
  return (
    <dl className={styles.facts}>
      <div>
        <dt>Reading</dt>
        <dd>{alert.reading}</dd>
      </div>
      <div>
        <dt>Limit</dt>
        <dd>{alert.limit}</dd>
      </div>
      <div>
        <dt>Opened</dt>
        <dd>
          <LocalTime time={alert.openedAt} timeZone={tz} />
        </dd>
      </div>
      <div>
        <dt>Last change</dt>
        <dd>
          <LocalTime time={alert.changedAt} timeZone={tz} />
        </dd>
      </div>
      <div>
        <dt>Acknowledged</dt>
        <dd>
          {alert.acknowledgedAt ? (
            <>
              {alert.acknowledgedBy ?? 'someone'}, <LocalTime time={alert.acknowledgedAt} timeZone={tz} />
            </>
          ) : (
            'Not yet'
          )}
        </dd>
      </div>
      {alert.acknowledgeNote ? (
        <div>
          <dt>Note</dt>
          <dd>{alert.acknowledgeNote}</dd>
        </div>
      ) : null}
      {alert.shelvedUntil ? (
        <div>
          <dt>Shelved until</dt>
          <dd>
            <LocalTime time={alert.shelvedUntil} timeZone={tz} />
            {alert.shelveReason ? `: ${alert.shelveReason}` : null}
          </dd>
        </div>
      ) : null}
    </dl>
  );
}

/** Stale and chattering, in words. */
export function AlertMarks({ alert }: { alert: AlertRowView }) {
  if (!alert.stale && !alert.chattering) return null;
  return (
    <ul className={styles.marks} aria-label="Marks">
      {alert.stale ? <li className={styles.mark}>Stale: active and not acknowledged for over a day</li> : null}
      {alert.chattering ? <li className={styles.mark}>Chattering: came and went three or more times in a minute</li> : null}
    </ul>
  );
}

/** One alert as a card of the list. */
function AlertCard({ alert, shelveChoices }: { alert: AlertRowView; shelveChoices: AlertsScreen['shelveChoices'] }) {
  const edge = alert.severity === 'alarm' ? styles.cardAlarm : alert.severity === 'warning' ? styles.cardWarning : '';
  return (
    <li className={`${styles.card} ${edge}`} data-alert={alert.id} data-state={alert.state}>
      <div className={styles.head}>
        {alert.mayAcknowledge ? (
          <label className={styles.pick}>
            <input type="checkbox" name="alertId" value={alert.id} form={BULK_FORM_ID} />
            <span className="visually-hidden">
              Select {alert.conditionName} on {alert.unitId}
            </span>
          </label>
        ) : null}
        <StateBadge state={alert.badge} label={alert.severityName} />
        <h3>
          <a href={alert.href}>{alert.conditionName}</a>
        </h3>
        <span className={styles.stateText}>{alert.stateText}</span>
      </div>
      <p className={styles.where}>
        <a href={alert.unitHref}>
          <span className="unit-id">{alert.unitId}</span>
          {alert.unitName ? ` · ${alert.unitName}` : ''}
        </a>{' '}
        at <a href={alert.siteHref}>{alert.siteName}</a>
      </p>
      <p className={styles.message}>{alert.message}</p>
      <AlertFacts alert={alert} />
      <AlertMarks alert={alert} />
      {alert.mayShelve && alert.state !== 'shelved' ? (
        <details className={styles.shelve}>
          <summary>Shelve…</summary>
          <ShelveForm alertId={alert.id} choices={shelveChoices} timeZone={alert.timeZone} />
        </details>
      ) : null}
    </li>
  );
}

/** The alerts, newest first, with the bulk acknowledgement above them and the shelved ones apart. */
export function AlertList({ screen }: { screen: AlertsScreen }) {
  const selectable = screen.canAct && [...screen.rows, ...screen.shelved].some((a) => a.mayAcknowledge);
  return (
    <section className="panel" aria-labelledby="alerts-heading">
      <h2 id="alerts-heading">Alerts, newest first</h2>
      <p className="note">{screen.summary}</p>
      {screen.canAct ? (
        // Kept when nothing is left to tick, so that what was just done stays in view.
        <div className={styles.bulk}>
          <p className={styles.hint}>
            {selectable ? 'Tick the alerts you take, below, then acknowledge them together with one note.' : 'Nothing on this page is waiting to be acknowledged.'}
          </p>
          <AcknowledgeForm formId={BULK_FORM_ID} label="Acknowledge selected" disabled={!selectable} />
        </div>
      ) : null}
      {screen.rows.length === 0 ? (
        <p className="note">{screen.emptyText}</p>
      ) : (
        <ol className={styles.list}>
          {screen.rows.map((a) => (
            <AlertCard key={a.id} alert={a} shelveChoices={screen.shelveChoices} />
          ))}
        </ol>
      )}
      {screen.shelved.length > 0 ? (
        <details>
          <summary>Shelved ({screen.shelved.length})</summary>
          <ol className={styles.list}>
            {screen.shelved.map((a) => (
              <AlertCard key={a.id} alert={a} shelveChoices={screen.shelveChoices} />
            ))}
          </ol>
        </details>
      ) : null}
      <nav className={styles.pager} aria-label="Pages">
        {screen.newestHref ? <a href={screen.newestHref}>Newest alerts</a> : null}
        {screen.olderHref ? <a href={screen.olderHref}>Older alerts</a> : null}
      </nav>
    </section>
  );
}
