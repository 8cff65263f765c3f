import nextVitals from 'eslint-config-next/core-web-vitals';
import nextTs from 'eslint-config-next/typescript';

const config = [
  ...nextVitals,
  ...nextTs,
  {
    ignores: ['node_modules/**', '.next/**', '.data/**', 'next-env.d.ts', 'test-results/**', 'playwright-report/**', 'db/migrations/**'],
  },
  {
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
    },
  },
  {
    // lib/stats is pure numerics: nothing of ours, no I/O, no framework.
    files: ['lib/stats/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { group: ['@/db/*', '@/app/*', '@/components/*', '@/lib/dal/*', 'next', 'next/*', 'react', 'drizzle-orm', 'mysql2', 'node:fs', 'fs'], message: 'lib/stats is pure: no I/O, database or framework imports.' },
          ],
        },
      ],
      'no-restricted-properties': ['error', { object: 'Math', property: 'random', message: 'Inject a seeded generator (lib/stats/random.ts).' }],
      'no-console': 'error',
    },
  },
];

export default config;
