import type { Metadata } from 'next';
import { forbidden } from 'next/navigation';
import { z } from 'zod';
import { getDatabase } from '@/db/client';
import { AUDIT_ACTIONS, getAuditPage } from '@/lib/auth/audit';
import { getPeople } from '@/lib/auth/people';
import { canAdminPeople, currentViewer } from '@/lib/auth/viewer';
import styles from '@/app/account/account.module.css';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Audit log' };

const querySchema = z.object({
  person: z.coerce.number().int().positive().optional().catch(undefined),
  action: z.enum(AUDIT_ACTIONS).optional().catch(undefined),
  before: z
    .string()
    .regex(/^\d{4}-\d\d-\d\dT[\d:.]+Z_\d{1,18}$/)
    .optional()
    .catch(undefined),
});

function cursorOf(at: Date, id: number) {
  return `${at.toISOString()}_${id}`;
}

export default async function AuditPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const viewer = await currentViewer();
  if (!canAdminPeople(viewer)) forbidden();
  const raw = await searchParams;
  const q = querySchema.parse({ person: raw.person || undefined, action: raw.action || undefined, before: raw.before || undefined });
  const before = q.before ? { at: new Date(q.before.split('_')[0]!), id: Number(q.before.split('_')[1]) } : undefined;
  const { db } = await getDatabase();
  const [page, people] = await Promise.all([getAuditPage({ db, personId: q.person, action: q.action, before }), getPeople({ db })]);
  const keep = new URLSearchParams();
  if (q.person) keep.set('person', String(q.person));
  if (q.action) keep.set('action', q.action);
  const nextHref = page.next ? `/admin/audit?${new URLSearchParams([...keep, ['before', cursorOf(page.next.at, page.next.id)]])}` : undefined;
  return (
    <>
      <nav aria-label="Breadcrumbs" className="breadcrumbs">
        <ol>
          <li>
            <a href="/admin/people">People</a>
          </li>
          <li aria-current="page">Audit log</li>
        </ol>
      </nav>
      <h1>Audit log</h1>
      <p className="note">Sign-ins and failed attempts, changes of people, credentials and setup: who, when (UTC), from which address, what changed. Newest first.</p>
      <form method="get" className="filters" aria-label="Filter the log">
        <label>
          Person
          <select name="person" defaultValue={q.person ? String(q.person) : ''}>
            <option value="">anyone</option>
            {people.map((p) => (
              <option key={p.id} value={p.id}>
                {p.email}
              </option>
            ))}
          </select>
        </label>
        <label>
          Action
          <select name="action" defaultValue={q.action ?? ''}>
            <option value="">any</option>
            {AUDIT_ACTIONS.map((a) => (
              <option key={a} value={a}>
                {a}
              </option>
            ))}
          </select>
        </label>
        <button type="submit">Show</button>
        {q.person || q.action ? <a href="/admin/audit">Clear filter</a> : null}
      </form>
      {page.rows.length === 0 ? (
        <p className="empty">{before ? 'No older entries.' : 'Nothing in the log matches.'}</p>
      ) : (
        <ol className={styles.audit} aria-label="Audit log entries, newest first">
          {page.rows.map((r) => (
            <li key={r.id}>
              <p className={styles.auditHead}>
                <strong>{r.action}</strong>
                {r.target ? <span> · {r.target}</span> : null}
              </p>
              <p className="note">
                <time dateTime={r.at.toISOString()}>{r.at.toISOString().slice(0, 19).replace('T', ' ')} UTC</time> · by {r.actor} · from{' '}
                <span className="unit-id">{r.ip ?? 'unknown address'}</span>
              </p>
              {Object.keys(r.detail).length ? <code className={styles.auditDetail}>{JSON.stringify(r.detail, null, 1)}</code> : null}
            </li>
          ))}
        </ol>
      )}
      <p>
        {before ? <a href={`/admin/audit${keep.size ? `?${keep}` : ''}`}>Newest</a> : null} {nextHref ? <a href={nextHref}>Older entries</a> : null}
      </p>
    </>
  );
}
