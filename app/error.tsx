'use client';

/** Any page that fails: what happened in words, and what to do; never a stack trace. */
export default function PageError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <section className="error-box" role="alert">
      <h1>This page could not be shown</h1>
      <p>
        Something went wrong while reading the data for this page (often the database was busy or out of reach for a moment).
      </p>
      <p>
        What to do: try again in a moment. If it keeps failing, look at the health of the parts (link below) and tell whoever runs
        millrace{error.digest ? <>, quoting the reference <code>{error.digest}</code></> : null}.
      </p>
      <p>
        <button type="button" onClick={() => reset()}>
          Try again
        </button>{' '}
        <a href="/api/health">Health of the parts</a> · <a href="/">Back to the fleet</a>
      </p>
    </section>
  );
}
