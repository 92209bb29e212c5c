import type { Metadata } from 'next';
import { forbidden, notFound } from 'next/navigation';
import { getDatabase } from '@/db/client';
import { getApiTokensOfPerson } from '@/lib/auth/api-tokens';
import { getDisplayLinksByCreator } from '@/lib/auth/display-links';
import { getPersonById } from '@/lib/auth/people';
import { canAdminPeople, currentViewer } from '@/lib/auth/viewer';
import { getSetupSites } from '@/lib/setup/queries';
import styles from '@/app/account/account.module.css';
import {
  createDisplayLinkAction,
  createTokenAction,
  resetPasswordAction,
  revokeDisplayLinkAction,
  revokeTokenAction,
  setDisabledAction,
  updateAccessAction,
} from '@/app/admin/actions';
import { AccessForm, ButtonForm, NameForm, PasswordResetForm } from '@/app/admin/_components/forms';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Person' };

function When({ at }: { at: Date | null }) {
  return at ? <time dateTime={at.toISOString()}>{at.toISOString().slice(0, 16).replace('T', ' ')} UTC</time> : <span className="muted">never</span>;
}

export default async function PersonPage({ params, searchParams }: { params: Promise<{ personId: string }>; searchParams: Promise<Record<string, string | undefined>> }) {
  const viewer = await currentViewer();
  if (!canAdminPeople(viewer)) forbidden();
  const { personId: raw } = await params;
  if (!/^[1-9][0-9]{0,15}$/.test(raw)) notFound();
  const personId = Number(raw);
  const { db } = await getDatabase();
  const person = await getPersonById({ db, personId });
  if (!person) notFound();
  const [tokens, links, sites] = await Promise.all([getApiTokensOfPerson({ db, personId }), getDisplayLinksByCreator({ db, personId }), getSetupSites({ db, viewer })]);
  const saved = (await searchParams).saved === 'added';
  const siteChoices = sites.map((s) => ({ id: s.id, name: s.name }));
  return (
    <>
      <nav aria-label="Breadcrumbs" className="breadcrumbs">
        <ol>
          <li>
            <a href="/admin/people">People</a>
          </li>
          <li aria-current="page">{person.email}</li>
        </ol>
      </nav>
      <h1>{person.email}</h1>
      {saved ? <p className={styles.done}>Added. Give them their first password in person or by phone; they choose their own at their first sign-in.</p> : null}
      <p>
        {person.disabled ? <span className={styles.disabledTag}>⊘ disabled: cannot sign in, tokens do not work</span> : 'Can sign in.'}{' '}
        {person.mustChangePassword ? <span className="muted">Must choose a new password at the next sign-in.</span> : null}
      </p>
      <div className="grid">
        <section className="panel" aria-labelledby="access-heading">
          <h2 id="access-heading">Role and sites</h2>
          <AccessForm action={updateAccessAction.bind(null, personId)} sites={siteChoices} role={person.role} chosen={person.siteIds} />
        </section>
        <section className="panel" aria-labelledby="state-heading">
          <h2 id="state-heading">Sign-in</h2>
          {person.disabled ? (
            <ButtonForm action={setDisabledAction.bind(null, personId, false)} label="Enable sign-in" />
          ) : (
            <ButtonForm action={setDisabledAction.bind(null, personId, true)} label="Disable: end their sessions now" />
          )}
          <h3 style={{ marginTop: '1rem' }}>Set a new password</h3>
          <p className="note">For a forgotten password. Their sessions end; they choose their own at the next sign-in.</p>
          <PasswordResetForm action={resetPasswordAction.bind(null, personId)} />
        </section>
      </div>
      <section className="panel" aria-labelledby="tokens-heading">
        <h2 id="tokens-heading">API tokens</h2>
        <p className="note">
          For scripts reading <code>/api/v1</code> as this person (same role and sites): <code>Authorization: Bearer …</code>. A token is shown once when made and kept
          only as a hash.
        </p>
        {tokens.length ? (
          <div className="table-scroll">
            <table>
              <thead>
                <tr>
                  <th scope="col">Name</th>
                  <th scope="col">Made</th>
                  <th scope="col">Last used</th>
                  <th scope="col">State</th>
                </tr>
              </thead>
              <tbody>
                {tokens.map((t) => (
                  <tr key={t.id}>
                    <td>{t.name}</td>
                    <td>
                      <When at={t.createdAt} />
                    </td>
                    <td>
                      <When at={t.lastUsedAt} />
                    </td>
                    <td>
                      {t.revokedAt ? (
                        <span className={styles.disabledTag}>⊘ revoked</span>
                      ) : (
                        <ButtonForm action={revokeTokenAction.bind(null, personId, t.id)} label="Revoke" />
                      )}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        ) : (
          <p>No tokens.</p>
        )}
        <NameForm action={createTokenAction.bind(null, personId)} label="Make a token" field="token-name" hint='What will use it, e.g. "monthly energy report".' />
      </section>
      <section className="panel" aria-labelledby="links-heading">
        <h2 id="links-heading">Display links made by this person</h2>
        <p className="note">A wall screen opens the link and shows one site or the fleet, read only, with no sign-in and nothing else. Anyone with the link sees it: revoke it when a screen goes.</p>
        {links.length ? (
          <div className="table-scroll">
            <table>
              <thead>
                <tr>
                  <th scope="col">Name</th>
                  <th scope="col">Shows</th>
                  <th scope="col">Last used</th>
                  <th scope="col">State</th>
                </tr>
              </thead>
              <tbody>
                {links.map((l) => (
                  <tr key={l.id}>
                    <td>{l.name}</td>
                    <td>{l.siteId ? <span className="unit-id">{l.siteId}</span> : 'the fleet'}</td>
                    <td>
                      <When at={l.lastUsedAt} />
                    </td>
                    <td>{l.revokedAt ? <span className={styles.disabledTag}>⊘ revoked</span> : <ButtonForm action={revokeDisplayLinkAction.bind(null, l.id)} label="Revoke" />}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        ) : (
          <p>No display links.</p>
        )}
        {person.role === 'admin' ? (
          <NameForm
            action={createDisplayLinkAction.bind(null, personId)}
            label="Make a display link"
            field="link-name"
            hint='Where the screen hangs, e.g. "control room wall".'
            scopes={[{ value: 'fleet', label: 'The whole fleet' }, ...siteChoices.map((s) => ({ value: s.id, label: `Site ${s.name}` }))]}
          />
        ) : (
          <p className="note">Only administrators make display links.</p>
        )}
      </section>
    </>
  );
}
