import type { PersonScreen } from '@/lib/people/screen';
import { createDisplayLinkAction, revokeDisplayLinkAction } from '@/app/admin/actions';
import { NameForm } from '@/app/admin/_components/forms';
import { CredentialTable, RevokeCell } from './credential-table';
import { When } from './when';

/** The wall-screen links this person made, and (for an administrator) a form to make one. */
export function DisplayLinksPanel({ personId, links, scopes }: { personId: number; links: PersonScreen['links']; scopes: PersonScreen['linkScopes'] }) {
  return (
    <section className="panel" aria-labelledby="links-heading">
      <h2 id="links-heading">Display links made by this person</h2>
      <p className="note">A wall screen opens the link and shows one site or the fleet, read only, with no sign-in and nothing else. Anyone with the link sees it: revoke it when a screen goes.</p>
      {links.length ? (
        <CredentialTable headings={['Name', 'Shows', 'Last used', 'State']}>
          {links.map((l) => (
            <tr key={l.id}>
              <td>{l.name}</td>
              <td>{l.siteId ? <span className="unit-id">{l.siteId}</span> : 'the fleet'}</td>
              <td>
                <When at={l.lastUsed} />
              </td>
              <RevokeCell revoked={l.revoked} action={revokeDisplayLinkAction.bind(null, l.id)} />
            </tr>
          ))}
        </CredentialTable>
      ) : (
        <p>No display links.</p>
      )}
      {scopes ? (
        <NameForm
          action={createDisplayLinkAction.bind(null, personId)}
          label="Make a display link"
          field="link-name"
          hint='Where the screen hangs, e.g. "control room wall".'
          scopes={scopes}
        />
      ) : (
        <p className="note">Only administrators make display links.</p>
      )}
    </section>
  );
}
