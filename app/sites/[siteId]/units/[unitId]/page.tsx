import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { Breadcrumbs } from '@/app/_components/breadcrumbs';
import { loadUnitScreen } from '@/lib/units/screen';
import { AlertsPanel } from './_components/alerts-panel';
import { EmfPanel } from './_components/emf-panel';
import { FindingsPanel } from './_components/findings-panel';
import { KePanel } from './_components/ke-panel';
import { NameplatePanel } from './_components/nameplate-panel';
import { SeriesPanel } from './_components/series-panel';
import { UnitHead } from './_components/unit-head';

export const dynamic = 'force-dynamic';

type Props = {
  params: Promise<{ siteId: string; unitId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
};

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { unitId } = await params;
  return { title: `Unit ${unitId}` };
}

/** One unit: its state, what the diagnosis found, the evidence, the Ke trend, the readings and the nameplate. */
export default async function UnitPage({ params, searchParams }: Props) {
  const { siteId, unitId } = await params;
  const { range } = await searchParams;
  const screen = await loadUnitScreen({ siteId, unitId, range });
  if (screen === undefined) notFound();
  const { site, unit, timeZone, nowMs } = screen;
  return (
    <>
      <Breadcrumbs trail={[{ label: 'Fleet', href: '/' }, { label: site.name, href: `/sites/${site.id}` }, { label: unit.id }]} />
      <UnitHead site={site} unit={unit} head={screen.head} timeZone={timeZone} nowMs={nowMs} />
      <FindingsPanel findings={screen.findings} timeZone={timeZone} nowMs={nowMs} />
      <AlertsPanel alerts={screen.alerts} timeZone={timeZone} nowMs={nowMs} />
      <EmfPanel emf={screen.emf} timeZone={timeZone} nowMs={nowMs} />
      <KePanel ke={screen.ke} timeZone={timeZone} />
      <SeriesPanel series={screen.series} timeZone={timeZone} />
      <NameplatePanel nameplate={screen.nameplate} />
    </>
  );
}
