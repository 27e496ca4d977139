// ESLint flat config: Next.js's rules (React, hooks, accessibility, Core Web Vitals) and
// typescript-eslint's recommended set. Every rule changed here says why beside it; a rule
// disabled on one line says why on that line. `npm run lint` allows no warnings.
import nextVitals from 'eslint-config-next/core-web-vitals';
import nextTs from 'eslint-config-next/typescript';
import tseslint from 'typescript-eslint';

export default tseslint.config(
  ...nextVitals,
  ...nextTs,
  {
    ignores: ['.next/**', '.next-test/**', '.next-bench/**', 'bench-results/**', 'backups/**', '.data/**', 'node_modules/**', 'test-results/**', 'playwright-report/**', 'tests/bench/out/**', 'next-env.d.ts'],
  },
  {
    rules: {
      // Unused code is an error, not a warning nobody reads. A name starting with _ marks a value
      // left out on purpose (a destructured field dropped from a copy).
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', destructuredArrayIgnorePattern: '^_', ignoreRestSiblings: true }],
      '@typescript-eslint/no-unused-expressions': 'error',
      // Off: it only reports that the React Compiler would skip a component using react-hook-form's
      // watch() or TanStack Table. We do not run the compiler, so there is nothing to act on.
      'react-hooks/incompatible-library': 'off',
    },
  },
  {
    files: ['tests/**/*.{ts,tsx}'],
    rules: {
      // Tests read JSON answers and database rows as they come and assert on their shape; typing
      // every body first would only repeat the assertions.
      '@typescript-eslint/no-explicit-any': 'off',
    },
  },
);
