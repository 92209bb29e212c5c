import type { Metadata } from 'next';
import { saveSiteAction } from '../../actions';
import { SetupCrumbs } from '../../_components/breadcrumbs';
import { SiteForm } from '../../_components/site-form';
import { initialFormState } from '../../form-state';
import { timeZoneNames } from '../../time-zones';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Add a site' };

export default function NewSitePage() {
  return (
    <>
      <SetupCrumbs trail={[{ label: 'Add a site' }]} />
      <h1>Add a site</h1>
      <p className="note">A place with units on it. Its units are added next.</p>
      <SiteForm action={saveSiteAction.bind(null, undefined)} initial={initialFormState()} timeZones={timeZoneNames()} submitLabel="Add site" />
    </>
  );
}
