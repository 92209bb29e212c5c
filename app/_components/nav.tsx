'use client';
import { usePathname } from 'next/navigation';

const LINKS = [
  { href: '/', label: 'Fleet', match: (p: string) => p === '/' || p.startsWith('/sites') },
  { href: '/alerts', label: 'Alerts', match: (p: string) => p.startsWith('/alerts') },
  { href: '/setup', label: 'Setup', match: (p: string) => p.startsWith('/setup') },
  { href: '/data-quality', label: 'Data quality', match: (p: string) => p.startsWith('/data-quality') },
] as const;

/** The main navigation; the current section carries aria-current="page". */
export function MainNav() {
  const path = usePathname() ?? '/';
  // A wall screen's display link leads nowhere else; before sign-in every link leads back to sign-in.
  if (path.startsWith('/display/') || path.startsWith('/sign-in')) return null;
  return (
    <nav aria-label="Main" className="main-nav">
      <ul>
        {LINKS.map((l) => (
          <li key={l.href}>
            <a href={l.href} aria-current={l.match(path) ? 'page' : undefined}>
              {l.label}
            </a>
          </li>
        ))}
      </ul>
    </nav>
  );
}
