import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { loadSiteScreen } from '@/lib/fleet/overview';
import { SITE_SORTS, SITE_SORT_LABEL, type SiteSort, type SiteTableParams } from '@/lib/fleet/site-table';
import { UNIT_STATES, UNIT_STATE_NAME } from '@/lib/fleet/unit-state';
import { resolveLimits } from '@/lib/diagnosis/limits';
import { StateBadge } from '@/app/_components/state-badge';
import { LocalTime } from '@/app/_components/local-time';
import { KeMark } from '@/app/_components/ke-mark';
import { Sparkline } from '@/app/_components/sparkline';
import { ago, formatNumber, formatPowerKw } from '@/app/_components/format';
import { LiveUpdates } from '@/app/_components/live-updates';

export const dynamic = 'force-dynamic';

type Props = { params: Promise<{ siteId: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { siteId } = await params;
  return { title: `Site ${siteId}` };
}

/** The link that sorts by `sort`: the other way round when it is already the sort. */
function sortHref(params: SiteTableParams, sort: SiteSort): string {
  const dir = params.sort === sort && params.dir === 'asc' ? 'desc' : 'asc';
  const q = new URLSearchParams({ sort, dir });
  if (params.state !== 'all') q.set('state', params.state);
  return `?${q.toString()}`;
}

function SortHeader({ params, sort, children, className }: { params: SiteTableParams; sort: SiteSort; children: React.ReactNode; className?: string }) {
  const active = params.sort === sort;
  return (
    <th scope="col" className={className} aria-sort={active ? (params.dir === 'asc' ? 'ascending' : 'descending') : undefined}>
      <a className="sort-link" href={sortHref(params, sort)} aria-current={active ? 'true' : undefined}>
        {children}
        {active ? <span aria-hidden="true">{params.dir === 'asc' ? ' ▲' : ' ▼'}</span> : null}
      </a>
    </th>
  );
}

export default async function SitePage({ params, searchParams }: Props) {
  const { siteId } = await params;
  const screen = await loadSiteScreen(siteId, await searchParams);
  if (screen === undefined) notFound();
  const { site, rows, params: table, problems } = screen;
  const now = new Date(screen.nowMs);
  const fromMs = screen.nowMs - site.sparkHours * 3_600_000;
  const shown = table.state === 'all' ? `all ${site.units.length} units` : `${rows.length} of ${site.units.length} units: ${UNIT_STATE_NAME[table.state]}`;
  return (
    <>
      <nav className="breadcrumbs" aria-label="Breadcrumbs">
        <ol>
          <li>
            <a href="/">Fleet</a>
          </li>
          <li aria-current="page">{site.name}</li>
        </ol>
      </nav>
      <div className="page-head">
        <div>
          <h1>{site.name}</h1>
          <p className="note">
            Local time at the site: <LocalTime time={now} timeZone={site.timezone} now={now} /> · times below are the site&apos;s own
          </p>
        </div>
        <LiveUpdates siteId={site.id} unitNames={Object.fromEntries(site.units.map((u) => [u.id, u.name ?? u.id]))} />
      </div>

      <form className="filters no-print" method="get" aria-label="Filter and sort units">
        <label>
          Show
          <select name="state" defaultValue={table.state}>
            <option value="all">All states</option>
            {UNIT_STATES.map((s) => (
              <option key={s} value={s}>
                {UNIT_STATE_NAME[s]}
              </option>
            ))}
          </select>
        </label>
        <label>
          Sort by
          <select name="sort" defaultValue={table.sort}>
            {SITE_SORTS.map((s) => (
              <option key={s} value={s}>
                {SITE_SORT_LABEL[s]}
              </option>
            ))}
          </select>
        </label>
        <label>
          Order
          <select name="dir" defaultValue={table.dir}>
            <option value="asc">Ascending</option>
            <option value="desc">Descending</option>
          </select>
        </label>
        <button type="submit">Apply</button>
        {table.state !== 'all' || table.sort !== 'state' || table.dir !== 'asc' ? <a href="?">Reset</a> : null}
      </form>
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
        <div className="table-scroll">
          <table className="stack site-units" data-testid="site-units">
            <caption>
              Units of {site.name}: {shown}. Power, speed, voltage and temperature are means of the last 10 minutes; the Ke scale runs from 0.90 to
              1.05 of nameplate, with the alarm line solid red, the warning line dashed and 1.00 grey.
            </caption>
            <thead>
              <tr>
                <SortHeader params={table} sort="unit">
                  Unit
                </SortHeader>
                <SortHeader params={table} sort="state">
                  State
                </SortHeader>
                <SortHeader params={table} sort="power" className="num">
                  Power
                </SortHeader>
                <th scope="col" className="num">
                  Speed
                </th>
                <th scope="col" className="num">
                  Line voltage
                </th>
                <SortHeader params={table} sort="ke" className="num">
                  <abbr title="measured Ke corrected for load and magnet temperature, over nameplate Ke, with its 95 % interval">Ke ratio</abbr>
                </SortHeader>
                <SortHeader params={table} sort="unbalance" className="num">
                  Unbalance
                </SortHeader>
                <SortHeader params={table} sort="stator" className="num">
                  Stator
                </SortHeader>
                <SortHeader params={table} sort="last">
                  Last sample
                </SortHeader>
                <th scope="col">Power, last {site.sparkHours} h</th>
              </tr>
            </thead>
            <tbody>
              {rows.length === 0 ? (
                <tr>
                  <td colSpan={10}>No unit in this state. <a href="?">Show all units</a>.</td>
                </tr>
              ) : (
                rows.map((u) => {
                  const limits = resolveLimits(u.diagnosisLimits ?? undefined);
                  return (
                    <tr key={u.id} data-unit={u.id} data-state={u.state.state}>
                      <td className="card-title" data-label="Unit">
                        <a href={`/sites/${site.id}/units/${u.id}`}>
                          <span className="unit-id">{u.id}</span>
                        </a>
                        {u.name ? <span className="muted"> {u.name}</span> : null}
                      </td>
                      <td data-label="State">
                        <StateBadge state={u.state.state} label={u.state.label} />
                        {u.state.reason && u.state.state !== 'not-judged' ? <span className="state-reason">{u.state.reason}</span> : null}
                      </td>
                      <td className="num" data-label="Power">
                        {formatPowerKw(u.kw)}
                      </td>
                      <td className="num" data-label="Speed">
                        {formatNumber(u.rpm, 0, 'rpm')}
                      </td>
                      <td className="num" data-label="Line voltage">
                        {formatNumber(u.voltsLl, 0, 'V')}
                      </td>
                      <td className="num" data-label="Ke ratio">
                        <KeMark ratio={u.keRatio} low={u.keRatioLow} high={u.keRatioHigh} warn={limits.keWarnRatio} alarm={limits.keAlarmRatio} />
                      </td>
                      <td className="num" data-label="Unbalance">
                        <span className={u.unbalancePct !== null && u.unbalancePct > limits.unbalanceAlarmPct ? 'state-fault' : undefined}>
                          {formatNumber(u.unbalancePct, 2, '%')}
                        </span>
                      </td>
                      <td className="num" data-label="Stator">
                        {formatNumber(u.statorC, 0, '°C')}
                      </td>
                      <td data-label="Last sample">
                        {u.lastSampleMs === null ? (
                          'never'
                        ) : (
                          <>
                            <LocalTime time={new Date(u.lastSampleMs)} timeZone={site.timezone} now={now} />{' '}
                            <span className="muted">{ago(new Date(u.lastSampleMs), now)}</span>
                          </>
                        )}
                      </td>
                      <td data-label={`Power, last ${site.sparkHours} h`}>
                        <Sparkline points={site.sparklines[u.id] ?? []} fromMs={fromMs} toMs={screen.nowMs} ratedKw={u.ratedKw} hours={site.sparkHours} />
                      </td>
                    </tr>
                  );
                })
              )}
            </tbody>
          </table>
        </div>
      )}
    </>
  );
}
