/** The data-quality screen's panels: the filter, the last day's counts by unit, the entries. */
import type { DataQualityScreen } from '@/lib/quality/screen';
import { LocalTime } from '@/app/_components/local-time';
import { PayloadBlock } from './payload-block';
import styles from '@/app/data-quality/quality.module.css';

/** Site and unit to filter by (a GET form: the address holds the filter). */
export function QualityFilter({ sites, query, filtered }: Pick<DataQualityScreen, 'sites' | 'query' | 'filtered'>) {
  return (
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
  );
}

/** Set-aside telemetry of the last 24 hours, by unit, most first. */
export function CountsByUnit({ counts, what }: Pick<DataQualityScreen, 'counts' | 'what'>) {
  return (
    <section className="panel" aria-labelledby="by-unit">
      <h2 id="by-unit">Last 24 hours, by unit</h2>
      {counts.rows.length === 0 ? (
        <p className="note">Nothing was set aside in the last 24 hours for {what}.</p>
      ) : (
        <>
          <p className="note">{counts.summary}</p>
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
                {counts.rows.map((u) => (
                  <tr key={`${u.siteId}/${u.unitId}`}>
                    <td className="card-title" data-label="Unit">
                      {u.href ? (
                        <a href={u.href}>
                          <span className="unit-id">{u.label}</span>
                        </a>
                      ) : (
                        <span>{u.label}</span>
                      )}
                    </td>
                    <td className="num" data-label="Set aside">
                      {u.count.toLocaleString('en-GB')}
                    </td>
                    <td data-label="Latest" className={styles.nowrap}>
                      <LocalTime time={u.lastAt} timeZone={u.timeZone} />
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
  );
}

/** The entries, newest first, a page at a time. */
export function QualityEntries({ screen }: { screen: DataQualityScreen }) {
  return (
    <section className="panel" aria-labelledby="entries">
      <h2 id="entries">Entries, newest first</h2>
      {screen.entries.length === 0 ? (
        <p className="note">{screen.emptyText}</p>
      ) : (
        <ol className={styles.entries}>
          {screen.entries.map((e) => (
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
        {screen.newestHref ? <a href={screen.newestHref}>Newest entries</a> : null}
        {screen.olderHref ? <a href={screen.olderHref}>Older entries ({screen.pageSize} a page)</a> : null}
      </nav>
    </section>
  );
}
