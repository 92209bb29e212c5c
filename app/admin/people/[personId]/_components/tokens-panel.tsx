import type { PersonToken } from '@/lib/people/screen';
import { createTokenAction, revokeTokenAction } from '@/app/admin/actions';
import { NameForm } from '@/app/admin/_components/forms';
import { CredentialTable, RevokeCell } from './credential-table';
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
        <CredentialTable headings={['Name', 'Made', 'Last used', 'State']}>
          {tokens.map((t) => (
            <tr key={t.id}>
              <td>{t.name}</td>
              <td>
                <When at={t.made} />
              </td>
              <td>
                <When at={t.lastUsed} />
              </td>
              <RevokeCell revoked={t.revoked} action={revokeTokenAction.bind(null, personId, t.id)} />
            </tr>
          ))}
        </CredentialTable>
      ) : (
        <p>No tokens.</p>
      )}
      <NameForm action={createTokenAction.bind(null, personId)} label="Make a token" field="token-name" hint='What will use it, e.g. "monthly energy report".' />
    </section>
  );
}
