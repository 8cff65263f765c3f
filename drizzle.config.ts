import { defineConfig } from 'drizzle-kit';

// drizzle-kit is used only to GENERATE migrations from db/schema.ts (`npm run db:generate`).
// Migrations are applied by db/migrate.ts with drizzle-orm's migrator, never by `push`.
export default defineConfig({
  dialect: 'mysql',
  schema: './db/schema.ts',
  out: './db/migrations',
  dbCredentials: {
    host: process.env.DB_HOST ?? '127.0.0.1',
    port: Number(process.env.DB_PORT ?? 3307),
    user: process.env.DB_USER ?? 'rhobook',
    password: process.env.DB_PASSWORD ?? 'rhobook-local',
    database: process.env.DB_NAME ?? 'rhobook',
  },
});
