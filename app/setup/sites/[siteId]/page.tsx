import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { loadSetupSiteScreen } from '@/lib/setup/screen';
import { saveSiteAction } from '@/app/setup/actions';
import { Breadcrumbs } from '@/app/_components/breadcrumbs';
import { SavedNote } from '@/app/setup/_components/saved-note';
import { SiteForm } from '@/app/setup/_components/site-form';
import { initialFormState } from '@/app/setup/form-state';
import { timeZoneNames } from '@/app/setup/time-zones';

export const dynamic = 'force-dynamic';

export async function generateMetadata({ params }: { params: Promise<{ siteId: string }> }): Promise<Metadata> {
  return { title: `Site ${(await params).siteId} · Setup` };
}

export default async function EditSitePage({ params, searchParams }: { params: Promise<{ siteId: string }>; searchParams: Promise<{ saved?: string }> }) {
  const { siteId } = await params;
  const { saved } = await searchParams;
  const screen = await loadSetupSiteScreen(siteId);
  if (!screen) notFound();
  const { site, units, editable } = screen;
  return (
    <>
      <Breadcrumbs trail={[{ label: 'Setup', href: '/setup' }, { label: site.name }]} />
      <h1>{site.name}</h1>
      <p className="note">
        Site <span className="unit-id">{site.id}</span> · <a href={`/sites/${site.id}`}>its units’ health</a>
      </p>
      <SavedNote saved={saved} what="Site" />
      {editable ? (
        <SiteForm
          action={saveSiteAction.bind(null, site.id)}
          initial={initialFormState(screen.form)}
          editingId={site.id}
          timeZones={timeZoneNames()}
          submitLabel="Save site"
        />
      ) : null}
      <section className="panel" aria-labelledby="units-heading">
        <h2 id="units-heading">Units on this site</h2>
        {units.length === 0 ? <p className="note">None yet.</p> : null}
        <ul>
          {units.map((u) => (
            <li key={u.id}>
              <a href={`/setup/units/${site.id}/${u.id}`}>
                <span className="unit-id">{u.id}</span>
                {u.name ? ` · ${u.name}` : ''}
              </a>{' '}
              <span className="muted">
                {u.kind === 'wind' ? 'wind' : 'hydro'}, {u.ratedKw} kW
              </span>
            </li>
          ))}
        </ul>
        {editable ? (
          <p>
            <a className="button" href={`/setup/units/new?site=${site.id}`}>
              Add a unit to {site.name}
            </a>
          </p>
        ) : null}
      </section>
    </>
  );
}
