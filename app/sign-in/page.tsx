import type { Metadata } from 'next';
import { loadSignInScreen, type SearchParams } from '@/lib/people/screen';
import styles from '@/app/account/account.module.css';
import { SignInForm } from './sign-in-form';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Sign in' };

export default async function SignInPage({ searchParams }: { searchParams: Promise<SearchParams> }) {
  const screen = loadSignInScreen(await searchParams);
  return (
    <div className={styles.narrow}>
      <h1>Sign in</h1>
      {screen.signedOut ? (
        <p className={styles.done} role="status">
          You are signed out.
        </p>
      ) : null}
      <p className="note">With the e-mail address and password an administrator gave you. Your password manager can fill both.</p>
      {screen.demoAdminEmail ? (
        <p className="note">
          Trying the demo? Sign in as <code>{screen.demoAdminEmail}</code> with the one-time password printed where millrace was started (only on its first start).
        </p>
      ) : null}
      <SignInForm next={screen.next} />
      <p className="note">
        Forgotten password? An administrator of millrace can set a new one for you (People page); you choose your own at the next sign-in.
      </p>
    </div>
  );
}
