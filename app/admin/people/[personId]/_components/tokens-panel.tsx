import type { PersonToken } from '@/lib/people/screen';
import styles from '@/app/account/account.module.css';
import { createTokenAction, revokeTokenAction } from '@/app/admin/actions';
import { ButtonForm, NameForm } from '@/app/admin/_components/forms';
import { When } from './when';

/** The person's API tokens: made, last used, revoke; and a form to make one (shown once). */
export function TokensPanel({ personId, tokens }: { personId: number; tokens: readonly PersonToken[] }) {
  return (
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
                    <When at={t.made} />
                  </td>
                  <td>
                    <When at={t.lastUsed} />
                  </td>
                  <td>
                    {t.revoked ? (
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
  );
}
