import type { Metadata } from 'next';
import { forbidden, notFound } from 'next/navigation';
import { loadPersonScreen, type SearchParams } from '@/lib/people/screen';
import { Breadcrumbs } from '@/app/_components/breadcrumbs';
import styles from '@/app/account/account.module.css';
import { AccessPanels } from './_components/access-panels';
import { DisplayLinksPanel } from './_components/display-links-panel';
import { TokensPanel } from './_components/tokens-panel';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Person' };

export default async function PersonPage({ params, searchParams }: { params: Promise<{ personId: string }>; searchParams: Promise<SearchParams> }) {
  const screen = await loadPersonScreen({ personId: (await params).personId, searchParams: await searchParams });
  if (screen === 'forbidden') forbidden();
  if (screen === 'not-found') notFound();
  const { person } = screen;
  return (
    <>
      <Breadcrumbs trail={[{ label: 'People', href: '/admin/people' }, { label: person.email }]} />
      <h1>{person.email}</h1>
      {screen.notice ? <p className={styles.done}>{screen.notice}</p> : null}
      <p>
        {person.disabled ? <span className={styles.disabledTag}>⊘ disabled: cannot sign in, tokens do not work</span> : 'Can sign in.'}{' '}
        {person.mustChangePassword ? <span className="muted">Must choose a new password at the next sign-in.</span> : null}
      </p>
      <AccessPanels person={person} roles={screen.roles} sites={screen.sites} />
      <TokensPanel personId={person.id} tokens={screen.tokens} />
      <DisplayLinksPanel personId={person.id} links={screen.links} scopes={screen.linkScopes} />
    </>
  );
}
