import nextVitals from 'eslint-config-next/core-web-vitals';
import tseslint from 'typescript-eslint';

const config = [
  { ignores: ['node_modules/**', '.next/**', 'data/**', 'scratch/**', 'next-env.d.ts', 'db/migrations/**'] },
  ...nextVitals,
  ...tseslint.configs.recommended,
  {
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', destructuredArrayIgnorePattern: '^_' }],
      // Pages link with plain anchors until there is client-side navigation worth having.
      '@next/next/no-html-link-for-pages': 'off',
    },
  },
];

export default config;
