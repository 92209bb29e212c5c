/**
 * Where a page sits: Fleet › Site › Unit, Setup › Site, People › Audit log. Every crumb but the
 * last links; the last is the page itself (`aria-current="page"`). One component, one label.
 */
export interface Crumb {
  readonly label: string;
  readonly href?: string;
}

export function Breadcrumbs({ trail }: { trail: readonly Crumb[] }) {
  return (
    <nav aria-label="Breadcrumbs" className="breadcrumbs">
      <ol>
        {trail.map((crumb, i) =>
          crumb.href !== undefined && i < trail.length - 1 ? (
            <li key={i}>
              <a href={crumb.href}>{crumb.label}</a>
            </li>
          ) : (
            <li key={i} aria-current="page">
              {crumb.label}
            </li>
          ),
        )}
      </ol>
    </nav>
  );
}
