import type { Metadata } from 'next';
import { loadNewUnitScreen } from '@/lib/setup/screen';
import { saveUnitAction } from '@/app/setup/actions';
import { Breadcrumbs } from '@/app/_components/breadcrumbs';
import { UnitForm } from '@/app/setup/_components/unit-form';
import { initialFormState } from '@/app/setup/form-state';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Add a unit' };

export default async function NewUnitPage({ searchParams }: { searchParams: Promise<{ site?: string | string[] }> }) {
  const { site } = await searchParams;
  const { sites, chosen, form } = await loadNewUnitScreen(site);
  if (sites.length === 0) {
    return (
      <>
        <Breadcrumbs trail={[{ label: 'Setup', href: '/setup' }, { label: 'Add a unit' }]} />
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
      <Breadcrumbs
        trail={[{ label: 'Setup', href: '/setup' }, ...(chosen ? [{ href: `/setup/sites/${chosen.id}`, label: chosen.name }] : []), { label: 'Add a unit' }]}
      />
      <h1>Add a unit{chosen ? ` to ${chosen.name}` : ''}</h1>
      <p className="note">The generator’s nameplate as the manufacturer gives it; the diagnosis compares what the unit measures against it.</p>
      <UnitForm
        action={saveUnitAction.bind(null, undefined)}
        initial={initialFormState(form)}
        sites={sites}
        submitLabel="Add unit"
      />
    </>
  );
}
