import type { Metadata } from 'next';
import type { ReactNode } from 'react';
import './globals.css';

export const metadata: Metadata = {
  title: 'millrace',
  description: 'Health and energy of small permanent-magnet wind and hydro generators',
};

export default function RootLayout({ children }: { children: ReactNode }) {
  return (
    <html lang="en">
      <body>
        <header className="masthead">
          <a href="/" className="brand">
            millrace
          </a>
          <span className="tagline">generator health and yield, site by site</span>
        </header>
        <main>{children}</main>
      </body>
    </html>
  );
}
