import type { Metadata } from 'next';
import { getDatabase } from '@/db/client';
import { currentViewer } from '@/lib/auth/viewer';
import { getSetupSites } from '@/lib/setup/queries';
import { saveUnitAction } from '@/app/setup/actions';
import { SetupCrumbs } from '@/app/setup/_components/breadcrumbs';
import { UnitForm } from '@/app/setup/_components/unit-form';
import { initialFormState } from '@/app/setup/form-state';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Add a unit' };

export default async function NewUnitPage({ searchParams }: { searchParams: Promise<{ site?: string | string[] }> }) {
  const { site } = await searchParams;
  const { db } = await getDatabase();
  const sites = await getSetupSites({ db, viewer: await currentViewer() });
  const chosen = sites.find((s) => s.id === (Array.isArray(site) ? site[0] : site));
  if (sites.length === 0) {
    return (
      <>
        <SetupCrumbs trail={[{ label: 'Add a unit' }]} />
        <h1>Add a unit</h1>
        <section className="empty">
          <p>
            A unit belongs to a site, and there is none yet. <a href="/setup/sites/new">Add a site</a> first.
          </p>
        </section>
      </>
    );
  }
  return (
    <>
      <SetupCrumbs trail={chosen ? [{ href: `/setup/sites/${chosen.id}`, label: chosen.name }, { label: 'Add a unit' }] : [{ label: 'Add a unit' }]} />
      <h1>Add a unit{chosen ? ` to ${chosen.name}` : ''}</h1>
      <p className="note">The generator’s nameplate as the manufacturer gives it; the diagnosis compares what the unit measures against it.</p>
      <UnitForm
        action={saveUnitAction.bind(null, undefined)}
        initial={initialFormState({ siteId: chosen?.id ?? sites[0]!.id, kind: 'wind', magnet: 'ndfeb', keRefC: '20' })}
        sites={sites.map((s) => ({ id: s.id, name: s.name }))}
        submitLabel="Add unit"
      />
    </>
  );
}
