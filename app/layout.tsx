import type { Metadata, Viewport } from 'next';
import type { ReactNode } from 'react';
import { AccountBar } from './_components/account-bar';
import { MainNav } from './_components/nav';
import './globals.css';

export const metadata: Metadata = {
  title: { default: 'millrace', template: '%s · millrace' },
  description: 'Health and energy of small permanent-magnet wind and hydro generators',
};

export const viewport: Viewport = { width: 'device-width', initialScale: 1 };

export default function RootLayout({ children }: { children: ReactNode }) {
  return (
    <html lang="en">
      <body>
        <a href="#main" className="skip-link">
          Skip to content
        </a>
        <header className="masthead">
          <a href="/" className="brand">
            millrace
          </a>
          <MainNav />
          <AccountBar />
        </header>
        <main id="main" tabIndex={-1}>
          {children}
        </main>
      </body>
    </html>
  );
}
