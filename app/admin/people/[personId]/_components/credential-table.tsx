import type { ReactNode } from 'react';
import styles from '@/app/account/account.module.css';
import type { AdminState } from '@/app/admin/actions';
import { ButtonForm } from '@/app/admin/_components/forms';

/** A table of credentials (API tokens, display links), scrolling sideways on a phone. */
export function CredentialTable({ headings, children }: { headings: readonly string[]; children: ReactNode }) {
  return (
    <div className="table-scroll">
      <table>
        <thead>
          <tr>
            {headings.map((h) => (
              <th key={h} scope="col">
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>{children}</tbody>
      </table>
    </div>
  );
}

/** A credential's state: revoked, or a button that revokes it. */
export function RevokeCell({ revoked, action }: { revoked: boolean; action: (previous: AdminState, data: FormData) => Promise<AdminState> }) {
  return <td>{revoked ? <span className={styles.disabledTag}>⊘ revoked</span> : <ButtonForm action={action} label="Revoke" />}</td>;
}
