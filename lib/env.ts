import { z } from 'zod';

/**
 * The application's configuration, read once from process.env and validated. Every variable has a
 * default that suits a developer's machine; production must set NEXTAUTH_SECRET and the database
 * password explicitly.
 */
const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  DB_HOST: z.string().default('127.0.0.1'),
  DB_PORT: z.coerce.number().int().min(1).max(65535).default(3307),
  DB_USER: z.string().min(1).default('rhobook'),
  DB_PASSWORD: z.string().default('rhobook-local'),
  DB_NAME: z.string().regex(/^[A-Za-z0-9_]+$/, 'DB_NAME may hold letters, digits and _ only').default('rhobook'),
  NEXTAUTH_SECRET: z.string().min(16).default('rhobook-development-secret-change-me'),
  NEXTAUTH_URL: z.string().url().optional(),
  DEMO_PASSWORD: z.string().min(8).default('rhobook-demo'),
  /** Failed sign-ins allowed per e-mail and per client address in the window before refusing. */
  SIGNIN_MAX_FAILURES: z.coerce.number().int().min(1).default(10),
  SIGNIN_WINDOW_MINUTES: z.coerce.number().int().min(1).default(15),
  /** Seconds after which the worker's heartbeat is reported stale by /api/health. */
  WORKER_STALE_SECONDS: z.coerce.number().int().min(5).default(60),
  UPLOAD_MAX_BYTES: z.coerce.number().int().min(1024).default(100 * 1024 * 1024),
  SMTP_URL: z.string().optional(),
  MAIL_FROM: z.string().default('Rhobook <rhobook@fenmoor.example>'),
});

export type Env = z.infer<typeof envSchema>;

let cached: Env | undefined;

export function env(): Env {
  if (!cached) {
    const parsed = envSchema.safeParse(process.env);
    if (!parsed.success) {
      const detail = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ');
      throw new Error(`Invalid environment configuration: ${detail}`);
    }
    cached = parsed.data;
  }
  return cached;
}
