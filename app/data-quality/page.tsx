import type { Metadata } from 'next';
import { loadDataQualityScreen } from '@/lib/quality/screen';
import { CountsByUnit, QualityEntries, QualityFilter } from './_components/panels';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Data quality' };

export default async function DataQualityPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const screen = await loadDataQualityScreen(await searchParams);
  return (
    <>
      <div className="page-head">
        <div>
          <h1>Data quality</h1>
          <p className="note">
            Telemetry the ingester set aside instead of storing: each message or sample with the reason it was refused and what arrived. Nothing is
            dropped silently; entries are kept as long as raw samples. Use it to tell a crew which device sends bad data, and what is wrong with it.
          </p>
        </div>
      </div>

      <QualityFilter sites={screen.sites} query={screen.query} filtered={screen.filtered} />
      {screen.problem ? (
        <div className="error-box" role="alert">
          <p>
            This address has a filter the screen cannot read ({screen.problem}). Showing {screen.what} instead; choose a site or unit above.
          </p>
        </div>
      ) : null}

      <CountsByUnit counts={screen.counts} what={screen.what} />

      <QualityEntries screen={screen} />
    </>
  );
}
