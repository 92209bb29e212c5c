import type { Metadata } from 'next';
import { loadAlertsScreen } from '@/lib/alerts/screen';
import { AlertFilter, AlertList } from './_components/panels';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Alerts' };

export default async function AlertsPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const screen = await loadAlertsScreen(await searchParams);
  return (
    <>
      <div className="page-head">
        <div>
          <h1>Alerts</h1>
          <p className="note">
            One alert per condition on a unit. The crews&apos; list holds what is open and what cleared before anyone acknowledged it. Acknowledge an
            alert when you take it; shelve one, with a reason, only while it is expected (planned work).
            {screen.canAct ? null : ' Your role sees alerts; crews, operators and administrators acknowledge them.'}
          </p>
        </div>
      </div>

      <AlertFilter query={screen.query} options={screen.options} filtered={screen.filtered} />
      {screen.problem ? (
        <div className="error-box" role="alert">
          <p>This address has a filter the screen cannot read ({screen.problem}). It is left out; choose the filter above.</p>
        </div>
      ) : null}

      <AlertList screen={screen} />
    </>
  );
}
