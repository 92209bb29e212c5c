import type { Metadata } from 'next';
import { saveSiteAction } from '@/app/setup/actions';
import { Breadcrumbs } from '@/app/_components/breadcrumbs';
import { SiteForm } from '@/app/setup/_components/site-form';
import { initialFormState } from '@/app/setup/form-state';
import { timeZoneNames } from '@/app/setup/time-zones';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Add a site' };

export default function NewSitePage() {
  return (
    <>
      <Breadcrumbs trail={[{ label: 'Setup', href: '/setup' }, { label: 'Add a site' }]} />
      <h1>Add a site</h1>
      <p className="note">A place with units on it. Its units are added next.</p>
      <SiteForm action={saveSiteAction.bind(null, undefined)} initial={initialFormState()} timeZones={timeZoneNames()} submitLabel="Add site" />
    </>
  );
}
