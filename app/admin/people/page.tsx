import type { Metadata } from 'next';
import { forbidden } from 'next/navigation';
import { getDatabase } from '@/db/client';
import { getPeople } from '@/lib/auth/people';
import { canAdminPeople, currentViewer } from '@/lib/auth/viewer';
import { getSetupSites } from '@/lib/setup/queries';
import styles from '@/app/account/account.module.css';
import { addPersonAction } from '@/app/admin/actions';
import { AddPersonForm } from '@/app/admin/_components/forms';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'People' };

const ROLE_NAME = { admin: 'Administrator', operator: 'Operator', crew: 'Crew', owner: 'Owner' } as const;

export default async function PeoplePage() {
  const viewer = await currentViewer();
  if (!canAdminPeople(viewer)) forbidden();
  const { db } = await getDatabase();
  const [people, sites] = await Promise.all([getPeople({ db }), getSetupSites({ db, viewer })]);
  return (
    <>
      <div className="page-head">
        <div>
          <h1>People</h1>
          <p className="note">
            Who can sign in, with which role and sites. <a href="/admin/audit">Audit log</a>
          </p>
        </div>
      </div>
      <div className="table-scroll">
        <table>
          <caption>{people.length === 0 ? 'Nobody has an account yet: add the first person below.' : `${people.length} ${people.length === 1 ? 'person' : 'people'}`}</caption>
          <thead>
            <tr>
              <th scope="col">E-mail address</th>
              <th scope="col">Role</th>
              <th scope="col">Sites</th>
              <th scope="col">State</th>
            </tr>
          </thead>
          <tbody>
            {people.map((p) => (
              <tr key={p.id}>
                <td>
                  <a href={`/admin/people/${p.id}`}>{p.email}</a>
                </td>
                <td>{ROLE_NAME[p.role]}</td>
                <td>{p.role === 'crew' || p.role === 'owner' ? p.siteIds.join(', ') || 'none' : 'all'}</td>
                <td>
                  {p.disabled ? <span className={styles.disabledTag}>⊘ disabled</span> : 'can sign in'}
                  {p.mustChangePassword && !p.disabled ? <span className="muted"> · must choose a password</span> : null}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <section className="panel" aria-labelledby="add-heading" style={{ maxWidth: '36rem' }}>
        <h2 id="add-heading">Add a person</h2>
        <AddPersonForm action={addPersonAction} sites={sites.map((s) => ({ id: s.id, name: s.name }))} />
      </section>
    </>
  );
}
