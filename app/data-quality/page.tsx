import type { Metadata } from 'next';
import { getDatabase } from '@/db/client';
import { currentViewer } from '@/lib/auth/viewer';
import { formatCursor, getQuarantineCountsByUnit, getQuarantinePage, parseCursor, QUARANTINE_PAGE_SIZE } from '@/lib/quality/queries';
import { getSetupSites } from '@/lib/setup/queries';
import { LocalTime } from '@/app/_components/local-time';
import { PayloadBlock } from './_components/payload-block';
import styles from './quality.module.css';
import { dataQualityQuerySchema } from './schema';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Data quality' };

type Search = Record<string, string | string[] | undefined>;

function one(v: string | string[] | undefined): string | undefined {
  return Array.isArray(v) ? v[0] : v;
}

function href(params: { site?: string; unit?: string; before?: string }): string {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v) q.set(k, v);
  const s = q.toString();
  return s ? `/data-quality?${s}` : '/data-quality';
}

export default async function DataQualityPage({ searchParams }: { searchParams: Promise<Search> }) {
  const raw = await searchParams;
  const parsed = dataQualityQuerySchema.safeParse({ site: one(raw.site), unit: one(raw.unit), before: one(raw.before) });
  const problem = parsed.success ? undefined : parsed.error.issues[0]!.message;
  const query = parsed.success ? parsed.data : { site: undefined, unit: undefined, before: undefined };
  const { db } = await getDatabase();
  const viewer = await currentViewer();
  const before = query.before ? parseCursor(query.before) : undefined;
  const [sites, page, counts] = await Promise.all([
    getSetupSites({ db, viewer }),
    getQuarantinePage({ db, viewer, siteId: query.site, unitId: query.unit, before }),
    getQuarantineCountsByUnit({ db, viewer, siteId: query.site, unitId: query.unit }),
  ]);
  const zoneOf = new Map(sites.map((s) => [s.id, s.timezone]));
  const filtered = query.site !== undefined || query.unit !== undefined;
  const what = query.unit ? `unit ${query.unit}` : query.site ? `site ${query.site}` : 'all sites';

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

      <form method="get" action="/data-quality" className={styles.filters} aria-label="Filter">
        <label>
          Site
          <select name="site" defaultValue={query.site ?? ''}>
            <option value="">All sites</option>
            {sites.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </select>
        </label>
        <label>
          Unit
          <select name="unit" defaultValue={query.unit ?? ''}>
            <option value="">All units</option>
            {sites.map((s) => (
              <optgroup key={s.id} label={s.name}>
                {s.units.map((u) => (
                  <option key={u.id} value={u.id}>
                    {u.id}
                    {u.name ? ` · ${u.name}` : ''}
                  </option>
                ))}
              </optgroup>
            ))}
          </select>
        </label>
        <button type="submit">Show</button>
        {filtered ? <a href="/data-quality">Clear filter</a> : null}
      </form>
      {problem ? (
        <div className="error-box" role="alert">
          <p>
            This address has a filter the screen cannot read ({problem}). Showing {what} instead; choose a site or unit above.
          </p>
        </div>
      ) : null}

      <section className="panel" aria-labelledby="by-unit">
        <h2 id="by-unit">Last 24 hours, by unit</h2>
        {counts.units.length === 0 ? (
          <p className="note">Nothing was set aside in the last 24 hours for {what}.</p>
        ) : (
          <>
            <p className="note">
              {counts.capped ? 'More than ' : ''}
              {counts.total.toLocaleString('en-GB')} {counts.total === 1 ? 'entry' : 'entries'} for {what}
              {counts.capped ? ' (counted over the newest only)' : ''}.
            </p>
            <div className="table-scroll">
              <table className="stack" aria-label="Telemetry set aside in the last 24 hours, by unit, most first">
                <thead>
                  <tr>
                    <th scope="col" className={styles.unitCell}>
                      Unit
                    </th>
                    <th scope="col" className={`num ${styles.nowrap}`}>
                      Set aside
                    </th>
                    <th scope="col" className={styles.nowrap}>
                      Latest
                    </th>
                    <th scope="col">Latest reason</th>
                  </tr>
                </thead>
                <tbody>
                  {counts.units.map((u) => (
                    <tr key={`${u.siteId}/${u.unitId}`}>
                      <td className="card-title" data-label="Unit">
                        {u.siteId && u.unitId ? (
                          <a href={href({ site: u.siteId, unit: u.unitId })}>
                            <span className="unit-id">
                              {u.siteId}/{u.unitId}
                            </span>
                          </a>
                        ) : (
                          <span>{u.siteId ? `${u.siteId} (no unit)` : 'Not a unit topic'}</span>
                        )}
                      </td>
                      <td className="num" data-label="Set aside">
                        {u.count.toLocaleString('en-GB')}
                      </td>
                      <td data-label="Latest" className={styles.nowrap}>
                        <LocalTime time={u.lastAt} timeZone={(u.siteId && zoneOf.get(u.siteId)) || 'UTC'} />
                      </td>
                      <td data-label="Latest reason">{u.lastReason}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          </>
        )}
      </section>

      <section className="panel" aria-labelledby="entries">
        <h2 id="entries">Entries, newest first</h2>
        {page.entries.length === 0 ? (
          <p className="note">{before ? 'No older entries.' : `Nothing set aside for ${what}: every message received was stored.`}</p>
        ) : (
          <ol className={styles.entries}>
            {page.entries.map((e) => (
              <li key={e.id} className={styles.entry}>
                <span className={styles.reason}>{e.reason}</span>
                <span className={styles.meta}>
                  <LocalTime time={e.receivedAt} timeZone={e.timezone ?? 'UTC'} />
                  <span className={styles.topic}>{e.topic}</span>
                  {e.sampleIndex !== null ? <span>sample {e.sampleIndex + 1} of the message</span> : <span>whole message</span>}
                </span>
                <PayloadBlock payload={e.payload} payloadBytes={e.payloadBytes} />
              </li>
            ))}
          </ol>
        )}
        <nav className={styles.pager} aria-label="Pages">
          {before ? <a href={href({ site: query.site, unit: query.unit })}>Newest entries</a> : null}
          {page.next ? (
            <a href={href({ site: query.site, unit: query.unit, before: formatCursor(page.next) })}>Older entries ({QUARANTINE_PAGE_SIZE} a page)</a>
          ) : null}
        </nav>
      </section>
    </>
  );
}
