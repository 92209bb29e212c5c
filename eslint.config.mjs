import nextVitals from 'eslint-config-next/core-web-vitals';
import tseslint from 'typescript-eslint';

// The house's dependency rules (DEVELOPERS.md, "Layout"): imports leave their folder through `@/`,
// app/ reads the database only through lib/, and lib/physics stays pure.
const CLIMBING = { group: ['../*', '../**'], message: "Import through '@/…' instead of climbing folders." };
const APP_READS_THROUGH_LIB = [
  { group: ['@/db', '@/db/**'], message: 'app/ reads and writes through lib/<area> (screen.ts, queries.ts, an action()); never db/ directly.' },
  { group: ['drizzle-orm', 'drizzle-orm/**'], message: 'app/ does not build queries: call lib/<area>.' },
];
const PHYSICS_PURE = {
  regex: '^(?!\\./[^/]+$|@/lib/physics/|@/lib/contract/)',
  message: 'lib/physics is pure: it imports only itself and lib/contract (no I/O, no database, no config, no packages).',
};

const config = [
  { ignores: ['node_modules/**', '.next/**', 'data/**', 'scratch/**', 'next-env.d.ts', 'db/migrations/**'] },
  ...nextVitals,
  ...tseslint.configs.recommended,
  {
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', destructuredArrayIgnorePattern: '^_' }],
      // Pages link with plain anchors until there is client-side navigation worth having.
      '@next/next/no-html-link-for-pages': 'off',
      'no-restricted-imports': ['error', { patterns: [CLIMBING] }],
    },
  },
  // Functions a screen or two long (DEVELOPERS.md, "Layout"); tests and benches may run longer.
  { files: ['app/**', 'lib/**', 'db/**', 'bin/**'], ignores: ['**/*.test.ts', '**/*.test.tsx'], rules: { 'max-lines-per-function': ['error', { max: 150 }] } },
  { files: ['app/**'], rules: { 'no-restricted-imports': ['error', { patterns: [CLIMBING, ...APP_READS_THROUGH_LIB] }] } },
  { files: ['lib/physics/**'], ignores: ['lib/physics/**/*.test.ts'], rules: { 'no-restricted-imports': ['error', { patterns: [PHYSICS_PURE] }] } },
];

export default config;
