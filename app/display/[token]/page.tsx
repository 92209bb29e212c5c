import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { loadDisplayScreen } from '@/lib/fleet/screen';
import { StateBadge } from '@/app/_components/state-badge';
import { SiteCard } from '@/app/_components/site-card';
import { ago, formatEnergyKwh, formatPowerKw } from '@/lib/text/format';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Display', referrer: 'no-referrer', robots: { index: false, follow: false } };

/** Seconds between reloads of a wall screen. */
const REFRESH_S = 60;

/**
 * A wall screen: one site or the fleet, read only, through a display link
 * (lib/auth/display-links.ts). No links to other pages; it reloads itself.
 * An unknown or revoked link is a 404 like any page that does not exist.
 */
export default async function DisplayPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const display = await loadDisplayScreen(token);
  if (!display) notFound();
  const link = display;
  const now = new Date(display.nowMs);
  const refresh = <meta httpEquiv="refresh" content={String(REFRESH_S)} />;
  if (display.kind === 'site') {
    const screen = display.site;
    return (
      <>
        {refresh}
        <h1>{screen.site.name}</h1>
        <p className="note">
          {link.name} · updated {now.toISOString().slice(11, 16)} UTC, every {REFRESH_S} s · read only
        </p>
        <div className="table-scroll">
          <table>
            <caption className="visually-hidden">Units of {screen.site.name}</caption>
            <thead>
              <tr>
                <th scope="col">Unit</th>
                <th scope="col">State</th>
                <th scope="col" className="num">
                  Power
                </th>
                <th scope="col" className="num">
                  Today
                </th>
                <th scope="col">Last sample</th>
              </tr>
            </thead>
            <tbody>
              {screen.rows.map((u) => (
                <tr key={u.id}>
                  <th scope="row" className="unit-id">
                    {u.name ?? u.id}
                  </th>
                  <td>
                    <StateBadge state={u.state.state} label={u.state.label} />
                    {u.state.reason ? <div className="note">{u.state.reason}</div> : null}
                  </td>
                  <td className="num">{formatPowerKw(u.kw)}</td>
                  <td className="num">{formatEnergyKwh(u.kwhToday)}</td>
                  <td>{ago(u.lastSampleMs === null ? null : new Date(u.lastSampleMs), now)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </>
    );
  }
  const fleet = display.fleet;
  return (
    <>
      {refresh}
      <h1>Fleet</h1>
      <p className="note">
        {link.name} · updated {now.toISOString().slice(11, 16)} UTC, every {REFRESH_S} s · read only
      </p>
      <div className="grid">
        {fleet.sites.map((site) => (
          <SiteCard key={site.id} site={site} now={now} linked={false} />
        ))}
      </div>
      {fleet.sites.length === 0 ? <p className="empty">No sites yet.</p> : null}
    </>
  );
}
