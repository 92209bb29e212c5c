import type { Metadata } from 'next';
import { safeNextPath } from '@/lib/auth/access';
import { DEMO_ADMIN_EMAIL } from '@/lib/auth/demo-admin';
import { getConfig } from '@/lib/config/env';
import styles from '@/app/account/account.module.css';
import { SignInForm } from './sign-in-form';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Sign in' };

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const params = await searchParams;
  const next = safeNextPath(typeof params.next === 'string' ? params.next : '/');
  const signedOut = params['signed-out'] === '1';
  const config = getConfig();
  const demo = config.DEMO && !config.DATABASE_URL;
  return (
    <div className={styles.narrow}>
      <h1>Sign in</h1>
      {signedOut ? (
        <p className={styles.done} role="status">
          You are signed out.
        </p>
      ) : null}
      <p className="note">With the e-mail address and password an administrator gave you. Your password manager can fill both.</p>
      {demo ? (
        <p className="note">
          Trying the demo? Sign in as <code>{DEMO_ADMIN_EMAIL}</code> with the one-time password printed where millrace was started (only on its first start).
        </p>
      ) : null}
      <SignInForm next={next} />
      <p className="note">
        Forgotten password? An administrator of millrace can set a new one for you (People page); you choose your own at the next sign-in.
      </p>
    </div>
  );
}
