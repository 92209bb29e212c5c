import type { Metadata } from 'next';
import { loadSetupScreen } from '@/lib/setup/screen';
import styles from './setup.module.css';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Setup' };

export default async function SetupPage() {
  const { sites, unitCount, editable } = await loadSetupScreen();
  return (
    <>
      <div className="page-head">
        <div>
          <h1>Setup</h1>
          <p className="note">
            Sites and the units on them, with each unit’s nameplate. {sites.length} {sites.length === 1 ? 'site' : 'sites'}, {unitCount}{' '}
            {unitCount === 1 ? 'unit' : 'units'}.
          </p>
        </div>
      </div>
      <ul className={styles.toolbar} aria-label="Setup actions">
        {editable ? (
          <>
            <li>
              <a className="button" href="/setup/sites/new">
                Add a site
              </a>
            </li>
            <li>
              <a className="button" href="/setup/import">
                Import FLEET.json
              </a>
            </li>
          </>
        ) : null}
        <li>
          <a className="button" href="/setup/export" download>
            Download FLEET.json
          </a>
        </li>
        <li>
          <a className="button" href="/setup/webhooks">
            Webhooks
          </a>
        </li>
      </ul>
      {!editable ? <p className="note">Your role may look at the setup but not change it.</p> : null}
      {sites.length === 0 ? (
        <section className="empty">
          <h2>No sites yet</h2>
          <p>
            Add a site, then its units; or import a FLEET.json file with them all (the same file <code>npx millrace units import</code> reads).
          </p>
        </section>
      ) : (
        sites.map((site) => (
          <section key={site.id} className="panel" aria-labelledby={`site-${site.id}`}>
            <div className={styles.siteHead}>
              <h2 id={`site-${site.id}`}>
                <a href={`/setup/sites/${site.id}`}>{site.name}</a> <span className="muted unit-id">{site.id}</span>
              </h2>
              <span className="note">Time zone {site.timezone}</span>
            </div>
            {site.units.length === 0 ? (
              <p className="note">No units on this site yet.</p>
            ) : (
              <div className="table-scroll">
                <table className="stack" aria-label={`Units of ${site.name}`}>
                  <thead>
                    <tr>
                      <th scope="col">Unit</th>
                      <th scope="col">Kind</th>
                      <th scope="col" className="num">
                        Rated kW
                      </th>
                      <th scope="col" className="num">
                        Poles
                      </th>
                    </tr>
                  </thead>
                  <tbody>
                    {site.units.map((u) => (
                      <tr key={u.id}>
                        <td className="card-title" data-label="Unit">
                          <a href={`/setup/units/${site.id}/${u.id}`}>
                            <span className="unit-id">{u.id}</span>
                            {u.name ? ` · ${u.name}` : ''}
                          </a>
                        </td>
                        <td data-label="Kind">{u.kind === 'wind' ? 'Wind' : 'Hydro'}</td>
                        <td className="num" data-label="Rated kW">
                          {u.ratedKw}
                        </td>
                        <td className="num" data-label="Poles">
                          {u.poles}
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            )}
            {editable ? (
              <p className={styles.siteActions}>
                <a href={`/setup/sites/${site.id}`}>Edit site</a>
                <a href={`/setup/units/new?site=${site.id}`}>Add a unit to {site.name}</a>
              </p>
            ) : null}
          </section>
        ))
      )}
    </>
  );
}
