import type { PersonScreen } from '@/lib/people/screen';
import { resetPasswordAction, setDisabledAction, updateAccessAction } from '@/app/admin/actions';
import { AccessForm, ButtonForm, PasswordResetForm } from '@/app/admin/_components/forms';

/** Side by side: the person's role and sites; whether they can sign in, and a new password for a forgotten one. */
export function AccessPanels({ person, roles, sites }: Pick<PersonScreen, 'person' | 'roles' | 'sites'>) {
  return (
    <div className="grid">
      <section className="panel" aria-labelledby="access-heading">
        <h2 id="access-heading">Role and sites</h2>
        <AccessForm action={updateAccessAction.bind(null, person.id)} roles={roles} sites={sites} role={person.role} chosen={person.siteIds} />
      </section>
      <section className="panel" aria-labelledby="state-heading">
        <h2 id="state-heading">Sign-in</h2>
        {person.disabled ? (
          <ButtonForm action={setDisabledAction.bind(null, person.id, false)} label="Enable sign-in" />
        ) : (
          <ButtonForm action={setDisabledAction.bind(null, person.id, true)} label="Disable: end their sessions now" />
        )}
        <h3 style={{ marginTop: '1rem' }}>Set a new password</h3>
        <p className="note">For a forgotten password. Their sessions end; they choose their own at the next sign-in.</p>
        <PasswordResetForm action={resetPasswordAction.bind(null, person.id)} />
      </section>
    </div>
  );
}
