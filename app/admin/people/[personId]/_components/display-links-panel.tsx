import type { PersonScreen } from '@/lib/people/screen';
import styles from '@/app/account/account.module.css';
import { createDisplayLinkAction, revokeDisplayLinkAction } from '@/app/admin/actions';
import { ButtonForm, NameForm } from '@/app/admin/_components/forms';
import { When } from './when';

/** The wall-screen links this person made, and (for an administrator) a form to make one. */
export function DisplayLinksPanel({ personId, links, scopes }: { personId: number; links: PersonScreen['links']; scopes: PersonScreen['linkScopes'] }) {
  return (
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
                    <When at={l.lastUsed} />
                  </td>
                  <td>{l.revoked ? <span className={styles.disabledTag}>⊘ revoked</span> : <ButtonForm action={revokeDisplayLinkAction.bind(null, l.id)} label="Revoke" />}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
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
