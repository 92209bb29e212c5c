import type { Metadata } from 'next';

export const metadata: Metadata = { title: 'Not found' };

/** An unknown address, site or unit (or one the viewer may not see: the two are not told apart). */
export default function NotFound() {
  return (
    <section className="error-box">
      <h1>Nothing here</h1>
      <p>There is no page, site or unit at this address, or it is not one you may see.</p>
      <p>What to do: go back to the fleet and pick the site and unit from there; check the address if you typed it.</p>
      <p>
        <a href="/">Back to the fleet</a> · <a href="/setup">Setup</a>
      </p>
    </section>
  );
}
