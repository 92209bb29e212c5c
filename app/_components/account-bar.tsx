import { headers } from 'next/headers';
import { PATH_HEADER, signedInViewer } from '@/lib/auth/request';
import { canAdminPeople } from '@/lib/auth/viewer';
import { signOutAction } from '@/app/sign-in/actions';

/** "Signed in as …", People for admins, and Sign out (a POST: nothing changes state on GET). */
export async function AccountBar() {
  const path = (await headers()).get(PATH_HEADER) ?? '/';
  if (path.startsWith('/display/')) return null;
  const viewer = await signedInViewer();
  if (!viewer || viewer.via !== 'session') {
    return path.startsWith('/sign-in') ? null : (
      <div className="account-bar">
        <a href={`/sign-in?next=${encodeURIComponent(path)}`}>Sign in</a>
      </div>
    );
  }
  return (
    <div className="account-bar">
      {canAdminPeople(viewer) ? (
        <a href="/admin/people" aria-current={path.startsWith('/admin') ? 'page' : undefined}>
          People
        </a>
      ) : null}
      <span className="account-who">
        Signed in as <a href="/account/password">{viewer.email}</a>
      </span>
      <form action={signOutAction}>
        <button type="submit">Sign out</button>
      </form>
    </div>
  );
}
