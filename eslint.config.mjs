import nextVitals from 'eslint-config-next/core-web-vitals';
import nextTs from 'eslint-config-next/typescript';

/**
 * Besides Next's rules, the layer rules of DEVELOPERS.md ("Architecture"), so that an import the
 * wrong way fails `npm run lint`; tests/unit/lint/layers.test.ts lints a bad file against each.
 *
 * 1. lib/stats is pure: it imports nothing of ours outside lib/stats (by alias or by relative path),
 *    no I/O, database or framework, never Math.random, never the console.
 * 2. Nothing below app/ imports from app/ (components, lib, workers, db).
 * 3. Drizzle tables are imported only where data is accessed: db/, lib/dal/, and the three
 *    infrastructure stores that are data access by nature and act for no person (the job queue and
 *    heartbeat in lib/jobs, the mail outbox and its sender in lib/mail, sign-in and the session in
 *    lib/auth). Everywhere else only types and the enum lists (roles, ...Statuses, ...Kinds,
 *    ...Severities, ...Targets, assetClasses) may be imported from db/schema.
 */

const SCHEMA_VALUES_ALLOWED = '^(roles|[a-z][A-Za-z]*(Statuses|Kinds|Classes|Severities|Targets))$';

const config = [
  ...nextVitals,
  ...nextTs,
  {
    ignores: ['node_modules/**', '.next/**', '.next-*/**', '.data/**', 'next-env.d.ts', 'test-results/**', 'playwright-report/**', 'db/migrations/**'],
  },
  {
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
    },
  },
  {
    // Rules 1 and 2, by resolved path (aliases and relative imports alike).
    files: ['**/*.{ts,tsx,mts,mjs,js}'],
    rules: {
      'import/no-restricted-paths': [
        'error',
        {
          zones: [
            {
              target: './lib/stats',
              from: '.',
              except: ['./lib/stats', './node_modules'],
              message: 'lib/stats is pure numerics: it imports nothing of ours outside lib/stats.',
            },
            {
              target: ['./components', './lib', './workers', './db', './proxy.ts'],
              from: './app',
              message: 'Imports run one way (app -> components, lib -> db): move what both need below app/.',
            },
          ],
        },
      ],
    },
  },
  {
    // Rule 1: no I/O, database or framework in lib/stats.
    files: ['lib/stats/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              regex: '^@/(?!lib/stats(/|$))',
              message: 'lib/stats is pure: it imports nothing of ours outside lib/stats.',
            },
            {
              group: ['next', 'next/*', 'react', 'react-dom', 'drizzle-orm', 'drizzle-orm/*', 'mysql2', 'mysql2/*', 'node:fs', 'node:fs/*', 'fs', 'fs/*', 'node:net', 'node:http', 'node:child_process'],
              message: 'lib/stats is pure: no I/O, database or framework imports.',
            },
          ],
        },
      ],
      'no-restricted-properties': ['error', { object: 'Math', property: 'random', message: 'Inject a seeded generator (lib/stats/random.ts).' }],
      'no-console': 'error',
    },
  },
  {
    // Rule 3.
    files: ['app/**/*.{ts,tsx}', 'components/**/*.{ts,tsx}', 'lib/**/*.{ts,tsx}', 'workers/**/*.ts', 'proxy.ts'],
    ignores: ['lib/dal/**', 'lib/jobs/queue.ts', 'lib/jobs/heartbeat.ts', 'lib/mail/**', 'lib/auth/**'],
    rules: {
      '@typescript-eslint/no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['@/db/schema', '**/db/schema'],
              allowTypeImports: true,
              allowImportNamePattern: SCHEMA_VALUES_ALLOWED,
              message: 'Drizzle tables belong to the data access layer: query through a function in lib/dal (types and enum lists may be imported).',
            },
          ],
        },
      ],
    },
  },
];

export default config;
