import type { Metadata } from 'next';
import { safeNextPath } from '@/lib/auth/access';
import { currentViewer } from '@/lib/auth/viewer';
import styles from '@/app/account/account.module.css';
import { PasswordChangeForm } from './password-form';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Your password' };

export default async function PasswordPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const viewer = await currentViewer();
  const raw = (await searchParams).next;
  const next = safeNextPath(typeof raw === 'string' ? raw : '/');
  const must = viewer.mustChangePassword === true;
  return (
    <div className={styles.narrow}>
      <h1>Your password</h1>
      {viewer.via !== 'session' ? (
        <p>Sign in first: only a signed-in person can change their password.</p>
      ) : (
        <>
          {must ? (
            <p className={styles.problem}>Someone else set your current password. Choose your own before you go on.</p>
          ) : (
            <p className="note">Signed in as {viewer.email}. Your other sessions end when you change it.</p>
          )}
          <PasswordChangeForm next={next} />
        </>
      )}
    </div>
  );
}
