/** Shown when a signed-in person opens a page their role does not allow. */
export default function Forbidden() {
  return (
    <section className="panel" aria-labelledby="forbidden-heading">
      <h1 id="forbidden-heading">Not allowed</h1>
      <p>Your role does not allow this page. If you need it, ask an administrator of millrace.</p>
      <p>
        <a href="/">Back to the fleet</a>
      </p>
    </section>
  );
}
