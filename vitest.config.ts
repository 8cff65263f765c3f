import { defineConfig } from 'vitest/config';
import path from 'node:path';

const alias = {
  '@': path.resolve(import.meta.dirname),
  // Next resolves 'server-only' to an empty module on the server; tests run server code directly.
  'server-only': path.resolve(import.meta.dirname, 'node_modules/server-only/empty.js'),
};

export default defineConfig({
  resolve: { alias },
  test: {
    projects: [
      {
        resolve: { alias },
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.test.ts'],
          environment: 'node',
          testTimeout: 60_000,
        },
      },
      {
        resolve: { alias },
        test: {
          name: 'integration',
          include: ['tests/integration/**/*.test.ts'],
          environment: 'node',
          testTimeout: 60_000,
          hookTimeout: 60_000,
          fileParallelism: false,
          globalSetup: ['tests/integration/global-setup.ts'],
          env: { DB_NAME: process.env.DB_NAME?.endsWith('_test') ? process.env.DB_NAME : 'rhobook_test' },
        },
      },
    ],
  },
});
