import type { Metadata } from 'next';
import { forbidden } from 'next/navigation';
import { loadAuditScreen, type SearchParams } from '@/lib/people/screen';
import { Breadcrumbs } from '@/app/_components/breadcrumbs';
import styles from '@/app/account/account.module.css';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Audit log' };

export default async function AuditPage({ searchParams }: { searchParams: Promise<SearchParams> }) {
  const screen = await loadAuditScreen(await searchParams);
  if (screen === 'forbidden') forbidden();
  return (
    <>
      <Breadcrumbs trail={[{ label: 'People', href: '/admin/people' }, { label: 'Audit log' }]} />
      <h1>Audit log</h1>
      <p className="note">Sign-ins and failed attempts, changes of people, credentials and setup: who, when (UTC), from which address, what changed. Newest first.</p>
      <form method="get" className="filters" aria-label="Filter the log">
        <label>
          Person
          <select name="person" defaultValue={screen.person}>
            <option value="">anyone</option>
            {screen.people.map((p) => (
              <option key={p.id} value={p.id}>
                {p.email}
              </option>
            ))}
          </select>
        </label>
        <label>
          Action
          <select name="action" defaultValue={screen.action}>
            <option value="">any</option>
            {screen.actions.map((a) => (
              <option key={a} value={a}>
                {a}
              </option>
            ))}
          </select>
        </label>
        <button type="submit">Show</button>
        {screen.filtered ? <a href="/admin/audit">Clear filter</a> : null}
      </form>
      {screen.entries.length === 0 ? (
        <p className="empty">{screen.empty}</p>
      ) : (
        <ol className={styles.audit} aria-label="Audit log entries, newest first">
          {screen.entries.map((r) => (
            <li key={r.id}>
              <p className={styles.auditHead}>
                <strong>{r.action}</strong>
                {r.target ? <span> · {r.target}</span> : null}
              </p>
              <p className="note">
                <time dateTime={r.at.dateTime}>{r.at.text}</time> · by {r.actor} · from <span className="unit-id">{r.ip}</span>
              </p>
              {r.detail ? <code className={styles.auditDetail}>{r.detail}</code> : null}
            </li>
          ))}
        </ol>
      )}
      <p>
        {screen.newestHref ? <a href={screen.newestHref}>Newest</a> : null} {screen.olderHref ? <a href={screen.olderHref}>Older entries</a> : null}
      </p>
    </>
  );
}
