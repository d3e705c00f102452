/**
 * `npm run lint` (run by `npm test` before the suites): ESLint's recommended rules, Next's rules (core web vitals, with
 * react-hooks and jsx-a11y), typescript-eslint's recommended rules, and eslint-config-prettier last
 * so no rule argues with the formatter (`npm run format`). Warnings fail the run (`--max-warnings 0`).
 */
import js from '@eslint/js';
import globals from 'globals';
import nextVitals from 'eslint-config-next/core-web-vitals';
import nextTypescript from 'eslint-config-next/typescript';
import prettier from 'eslint-config-prettier/flat';

const config = [
  js.configs.recommended,
  ...nextVitals,
  ...nextTypescript,
  {
    rules: {
      // `catch {}` is how a best-effort step says "failure here changes nothing"; other empty blocks are leftovers.
      'no-empty': ['error', { allowEmptyCatch: true }],
      // An unused name is a leftover; a leading underscore says "unused on purpose".
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none', ignoreRestSiblings: true },
      ],
    },
    linterOptions: { reportUnusedDisableDirectives: 'error' },
  },
  {
    // A function a reader cannot hold in their head gets split into named steps.
    files: ['lib/**/*.ts', 'components/**/*.tsx', 'app/**/*.ts', 'app/**/*.tsx'],
    rules: { 'max-lines-per-function': ['error', { max: 150, skipBlankLines: true, skipComments: true }] },
  },
  {
    // Library modules form a tree: a cycle means a shared part wants its own module.
    files: ['lib/**/*.ts'],
    rules: { 'import/no-cycle': ['error', { ignoreExternal: true }] },
  },
  {
    // CommonJS by necessity: migrations and seeders (sequelize-cli), the db CLI config, the PDF worker's entry.
    files: ['**/*.cjs'],
    languageOptions: { sourceType: 'commonjs', globals: globals.node },
    rules: { '@typescript-eslint/no-require-imports': 'off' },
  },
  {
    files: ['**/*.mjs', 'scripts/**/*.ts'],
    languageOptions: { globals: globals.node },
  },
  prettier,
  {
    ignores: ['.next/**', '.next-*/**', 'data/**', 'test-results/**', 'playwright-report/**', 'next-env.d.ts', 'public/**'],
  },
];

export default config;
