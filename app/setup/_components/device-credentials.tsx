'use client';
/**
 * "Device credentials" of the unit edit page: the unit's MQTT username and
 * when its password was issued or last rotated, and a button that issues or
 * rotates it (a POST through a server action, never on GET). A new password is
 * shown once, with a copy button: only its hash is kept.
 */
import { useActionState, useState } from 'react';
import type { DeviceCredentialsState } from '@/app/setup/device-actions';
import formStyles from './form.module.css';
import styles from './device-credentials.module.css';

export interface DeviceAccountView {
  username: string;
  /** ISO-8601 times. */
  createdAt: string;
  rotatedAt: string;
  revokedAt: string | null;
}

const when = (iso: string) => <time dateTime={iso}>{new Date(iso).toISOString().replace('T', ' ').slice(0, 16)} UTC</time>;

export function CopyButton({ text, label }: { text: string; label: string }) {
  const [state, setState] = useState<'idle' | 'copied' | 'failed'>('idle');
  return (
    <>
      <button
        type="button"
        className={styles.copy}
        aria-label={`Copy the ${label}`}
        onClick={() => {
          // No clipboard outside a secure context (plain HTTP on another host): say so.
          if (!navigator.clipboard) return setState('failed');
          navigator.clipboard.writeText(text).then(
            () => setState('copied'),
            () => setState('failed'),
          );
        }}
      >
        Copy
      </button>
      <span role="status">{state === 'copied' ? 'Copied.' : state === 'failed' ? 'Copy did not work here: select the text and copy it.' : ''}</span>
    </>
  );
}

export function DeviceCredentials({
  siteId,
  unitId,
  account,
  canEdit,
  action,
}: {
  siteId: string;
  unitId: string;
  account: DeviceAccountView | undefined;
  canEdit: boolean;
  /** The form action: issues or rotates, or with `intent=revoke` revokes. */
  action: (previous: DeviceCredentialsState, data: FormData) => Promise<DeviceCredentialsState>;
}) {
  const [state, submit, pending] = useActionState(action, { submitted: 0 });
  const issued = state.issued;
  const live = account && account.revokedAt === null;
  return (
    <section className={styles.section} aria-labelledby="device-credentials-title" id="device-credentials">
      <h2 id="device-credentials-title">Device credentials</h2>
      <p className="note">
        The unit&apos;s logger signs in to the MQTT broker with these and may publish only to{' '}
        <code className={styles.mono}>
          millrace/{siteId}/{unitId}/telemetry
        </code>{' '}
        and <code className={styles.mono}>…/presence</code>.
      </p>
      {account ? (
        <dl className={styles.facts}>
          <dt>Username</dt>
          <dd className={styles.mono}>{account.username}</dd>
          <dt>Issued</dt>
          <dd>{when(account.createdAt)}</dd>
          <dt>Password set</dt>
          <dd>{account.rotatedAt === account.createdAt ? 'when issued' : when(account.rotatedAt)}</dd>
          {account.revokedAt ? (
            <>
              <dt>State</dt>
              <dd className={styles.revoked}>Revoked {when(account.revokedAt)}: the device cannot connect</dd>
            </>
          ) : null}
        </dl>
      ) : (
        <p>No credentials yet: the unit&apos;s device cannot connect to the broker until they are issued.</p>
      )}
      {issued ? (
        <div className={styles.secret} role="status" aria-live="polite">
          <p className={styles.once}>New password, shown once: copy it into the device&apos;s settings now.</p>
          <p>Only a hash is kept; if it is lost, rotate again. {issued.rotated ? 'The old password no longer works, and a device still using it was cut off.' : ''}</p>
          <div className={styles.value}>
            <span>Username</span> <code data-testid="device-username">{issued.username}</code> <CopyButton text={issued.username} label="username" />
          </div>
          <div className={styles.value}>
            <span>Password</span> <code data-testid="device-password">{issued.password}</code> <CopyButton text={issued.password} label="password" />
          </div>
          <p>On Mosquitto, export the broker&apos;s files again and reload it (README, production).</p>
        </div>
      ) : null}
      {state.error ? (
        <p className={styles.problem} role="alert">
          {state.error}
        </p>
      ) : null}
      {state.revoked ? (
        <p role="status" className={styles.revoked}>
          Revoked: the device cannot connect, and was cut off if it was connected.
        </p>
      ) : null}
      {canEdit ? (
        <>
          <form action={submit}>
            {live ? <p className="note">Rotating cuts the device off at once: it needs the new password to connect again.</p> : null}
            <div className={formStyles.actions}>
              <button type="submit" name="intent" value="issue" className={formStyles.primary} disabled={pending}>
                {pending ? 'Working…' : live ? 'Rotate password' : 'Issue credentials'}
              </button>
            </div>
          </form>
          {live ? (
            <form action={submit} className={styles.revokeForm}>
              <p className="note">A lost or stolen device: revoke its account. Issuing credentials again brings it back with a new password.</p>
              <div className={formStyles.actions}>
                <button type="submit" name="intent" value="revoke" className={styles.copy} disabled={pending}>
                  {pending ? 'Working…' : 'Revoke credentials'}
                </button>
              </div>
            </form>
          ) : null}
        </>
      ) : (
        <p className="note">Only an administrator or operator may issue or rotate them.</p>
      )}
    </section>
  );
}
