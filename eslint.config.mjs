// ESLint flat config: Next.js's rules (React, hooks, accessibility, Core Web Vitals) and
// typescript-eslint's recommended set. A rule turned off or down here says why beside it.
import nextVitals from 'eslint-config-next/core-web-vitals';
import nextTs from 'eslint-config-next/typescript';
import tseslint from 'typescript-eslint';

export default tseslint.config(
  ...nextVitals,
  ...nextTs,
  {
    ignores: ['.next/**', '.next-test/**', '.data/**', 'node_modules/**', 'test-results/**', 'playwright-report/**', 'tests/bench/out/**', 'next-env.d.ts'],
  },
  {
    rules: {
      // Unused code is an error here, not a warning: a warning nobody reads is noise. A name
      // starting with _ marks a deliberately unused value (a destructured field left out).
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', destructuredArrayIgnorePattern: '^_', ignoreRestSiblings: true }],
      '@typescript-eslint/no-unused-expressions': 'error',
    },
  },
);
