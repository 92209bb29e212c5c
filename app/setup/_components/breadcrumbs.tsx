/** Where a setup page sits: Setup › Site › Unit. The last crumb is the page itself. */
export function SetupCrumbs({ trail }: { trail: ReadonlyArray<{ href?: string; label: string }> }) {
  return (
    <nav aria-label="Breadcrumb" className="breadcrumbs">
      <ol>
        <li>
          <a href="/setup">Setup</a>
        </li>
        {trail.map((c, i) => (
          <li key={i}>{c.href ? <a href={c.href}>{c.label}</a> : <span aria-current="page">{c.label}</span>}</li>
        ))}
      </ol>
    </nav>
  );
}
