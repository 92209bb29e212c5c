// Next.js configuration. The settings module is loaded first so that a bad
// environment variable fails the build (and start-up) with one clear line.
import { tsImport } from 'tsx/esm/api';

const { loadConfig } = await tsImport('./lib/config/env.ts', import.meta.url);
try {
  loadConfig();
} catch (error) {
  console.error(`millrace: ${error.message}`);
  process.exit(2);
}

/** @type {import('next').NextConfig} */
const nextConfig = {
  reactStrictMode: true,
  poweredByHeader: false,
  // Database drivers and the broker stay plain Node modules, loaded at run time.
  serverExternalPackages: ['@electric-sql/pglite', 'postgres', 'aedes', 'aedes-persistence', 'mqtt', 'tsx'],
  // Types are checked by `npm run typecheck` (CI runs it); the build need not repeat it.
  typescript: { ignoreBuildErrors: true },
  // forbidden() in pages a signed-in person may not open (lib/auth, app/forbidden.tsx).
  experimental: { authInterrupts: true },
};

export default nextConfig;
