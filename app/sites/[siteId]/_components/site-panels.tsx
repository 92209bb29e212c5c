/** The site page's panels: the filter and sort form, and the table of units. */
import type { SiteScreen } from '@/lib/fleet/screen';
import { SITE_SORTS, SITE_SORT_LABEL, type SiteSort, type SiteTableParams } from '@/lib/fleet/site-table';
import { UNIT_STATES, UNIT_STATE_NAME } from '@/lib/fleet/unit-state';
import { formatNumber, formatPowerKw, ago } from '@/lib/text/format';
import { StateBadge } from '@/app/_components/state-badge';
import { LocalTime } from '@/app/_components/local-time';
import { KeMark } from '@/app/_components/ke-mark';
import { Sparkline } from '@/app/_components/sparkline';

function SortHeader({
  params,
  hrefs,
  sort,
  children,
  className,
}: {
  params: SiteTableParams;
  hrefs: Record<SiteSort, string>;
  sort: SiteSort;
  children: React.ReactNode;
  className?: string;
}) {
  const active = params.sort === sort;
  return (
    <th scope="col" className={className} aria-sort={active ? (params.dir === 'asc' ? 'ascending' : 'descending') : undefined}>
      <a className="sort-link" href={hrefs[sort]} aria-current={active ? 'true' : undefined}>
        {children}
        {active ? <span aria-hidden="true">{params.dir === 'asc' ? ' ▲' : ' ▼'}</span> : null}
      </a>
    </th>
  );
}

/** Which units to show and in what order (a GET form: the address holds the choice). */
export function SiteFilters({ table, filtered }: { table: SiteTableParams; filtered: boolean }) {
  return (
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
      {filtered ? <a href="?">Reset</a> : null}
    </form>
  );
}

/** Every unit of the site with its readings, state and Ke against its own lines. */
export function SiteUnitsTable({ screen }: { screen: SiteScreen }) {
  const { site, rows, params: table, shown } = screen;
  const now = new Date(screen.nowMs);
  return (
    <div className="table-scroll">
      <table className="stack site-units" data-testid="site-units">
        <caption>
          Units of {site.name}: {shown}. Power, speed, voltage and temperature are means of the last 10 minutes; the Ke scale runs from 0.90 to
          1.05 of nameplate, with the alarm line solid red, the warning line dashed and 1.00 grey.
        </caption>
        <thead>
          <tr>
            <SortHeader params={table} hrefs={screen.sortHrefs} sort="unit">
              Unit
            </SortHeader>
            <SortHeader params={table} hrefs={screen.sortHrefs} sort="state">
              State
            </SortHeader>
            <SortHeader params={table} hrefs={screen.sortHrefs} sort="power" className="num">
              Power
            </SortHeader>
            <th scope="col" className="num">
              Speed
            </th>
            <th scope="col" className="num">
              Line voltage
            </th>
            <SortHeader params={table} hrefs={screen.sortHrefs} sort="ke" className="num">
              <abbr title="measured Ke corrected for load and magnet temperature, over nameplate Ke, with its 95 % interval">Ke ratio</abbr>
            </SortHeader>
            <SortHeader params={table} hrefs={screen.sortHrefs} sort="unbalance" className="num">
              Unbalance
            </SortHeader>
            <SortHeader params={table} hrefs={screen.sortHrefs} sort="stator" className="num">
              Stator
            </SortHeader>
            <SortHeader params={table} hrefs={screen.sortHrefs} sort="last">
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
                    <KeMark ratio={u.keRatio} low={u.keRatioLow} high={u.keRatioHigh} warn={u.keWarnRatio} alarm={u.keAlarmRatio} />
                  </td>
                  <td className="num" data-label="Unbalance">
                    <span className={u.unbalanceAlarm ? 'state-fault' : undefined}>
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
                    <Sparkline points={site.sparklines[u.id] ?? []} fromMs={screen.sparkFromMs} toMs={screen.nowMs} ratedKw={u.ratedKw} hours={site.sparkHours} />
                  </td>
                </tr>
              );
            })
          )}
        </tbody>
      </table>
    </div>
  );
}
