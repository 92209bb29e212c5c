import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { loadSiteScreen } from '@/lib/fleet/screen';
import { Breadcrumbs } from '@/app/_components/breadcrumbs';
import { LocalTime } from '@/app/_components/local-time';
import { LiveUpdates } from '@/app/_components/live-updates';
import { SiteFilters, SiteUnitsTable } from './_components/site-panels';

export const dynamic = 'force-dynamic';

type Props = { params: Promise<{ siteId: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { siteId } = await params;
  return { title: `Site ${siteId}` };
}

export default async function SitePage({ params, searchParams }: Props) {
  const { siteId } = await params;
  const screen = await loadSiteScreen(siteId, await searchParams);
  if (screen === undefined) notFound();
  const { site, problems } = screen;
  const now = new Date(screen.nowMs);
  return (
    <>
      <Breadcrumbs trail={[{ label: 'Fleet', href: '/' }, { label: site.name }]} />
      <div className="page-head">
        <div>
          <h1>{site.name}</h1>
          <p className="note">
            Local time at the site: <LocalTime time={now} timeZone={site.timezone} now={now} /> · times below are the site&apos;s own
          </p>
          <p className="note" data-testid="site-alerts">
            Open alerts: {screen.alerts.open === 0 ? screen.alerts.text : <a href={screen.alerts.href}>{screen.alerts.text}</a>}
          </p>
        </div>
        <LiveUpdates siteId={site.id} unitNames={Object.fromEntries(site.units.map((u) => [u.id, u.name ?? u.id]))} />
      </div>

      <SiteFilters table={screen.params} filtered={screen.filtered} />
      {problems.length > 0 ? (
        <p className="note" role="status" data-testid="param-problems">
          {problems.join('. ')}.
        </p>
      ) : null}

      {site.units.length === 0 ? (
        <section className="empty">
          <h2>No units on this site yet</h2>
          <p>
            Add one on <a href={`/setup/units/new?site=${site.id}`}>Setup</a>, or import a fleet file.
          </p>
        </section>
      ) : (
        <SiteUnitsTable screen={screen} />
      )}
    </>
  );
}
