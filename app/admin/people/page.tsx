import type { Metadata } from 'next';
import { forbidden } from 'next/navigation';
import { loadPeopleScreen } from '@/lib/people/screen';
import styles from '@/app/account/account.module.css';
import { addPersonAction } from '@/app/admin/actions';
import { AddPersonForm } from '@/app/admin/_components/forms';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'People' };

export default async function PeoplePage() {
  const screen = await loadPeopleScreen();
  if (screen === 'forbidden') forbidden();
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
          <caption>{screen.caption}</caption>
          <thead>
            <tr>
              <th scope="col">E-mail address</th>
              <th scope="col">Role</th>
              <th scope="col">Sites</th>
              <th scope="col">State</th>
            </tr>
          </thead>
          <tbody>
            {screen.people.map((p) => (
              <tr key={p.id}>
                <td>
                  <a href={p.href}>{p.email}</a>
                </td>
                <td>{p.roleName}</td>
                <td>{p.sites}</td>
                <td>
                  {p.disabled ? <span className={styles.disabledTag}>⊘ disabled</span> : 'can sign in'}
                  {p.mustChoosePassword ? <span className="muted"> · must choose a password</span> : null}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <section className="panel" aria-labelledby="add-heading" style={{ maxWidth: '36rem' }}>
        <h2 id="add-heading">Add a person</h2>
        <AddPersonForm action={addPersonAction} roles={screen.roles} sites={screen.sites} />
      </section>
    </>
  );
}
