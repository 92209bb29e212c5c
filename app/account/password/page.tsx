import type { Metadata } from 'next';
import { loadPasswordScreen, type SearchParams } from '@/lib/people/screen';
import styles from '@/app/account/account.module.css';
import { PasswordChangeForm } from './password-form';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Your password' };

export default async function PasswordPage({ searchParams }: { searchParams: Promise<SearchParams> }) {
  const screen = await loadPasswordScreen(await searchParams);
  return (
    <div className={styles.narrow}>
      <h1>Your password</h1>
      {!screen.signedIn ? (
        <p>Sign in first: only a signed-in person can change their password.</p>
      ) : (
        <>
          {screen.mustChange ? (
            <p className={styles.problem}>Someone else set your current password. Choose your own before you go on.</p>
          ) : (
            <p className="note">Signed in as {screen.email}. Your other sessions end when you change it.</p>
          )}
          <PasswordChangeForm next={screen.next} />
        </>
      )}
    </div>
  );
}
