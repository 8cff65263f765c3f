import { z } from 'zod';
import { parseTrustedProxies } from '@/lib/auth/client-address';

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
  /** Sign-in throttle (lib/auth/throttle.ts): failures of one account from one address before waits start. */
  SIGNIN_FREE_FAILURES: z.coerce.number().int().min(1).default(5),
  /** Longest wait (seconds) for one account from one address, or one address over all accounts. */
  SIGNIN_MAX_DELAY_SECONDS: z.coerce.number().int().min(1).default(900),
  /** Longest wait (seconds) for one account over all addresses: what its owner may have to wait after someone else's failures. */
  SIGNIN_ACCOUNT_DELAY_SECONDS: z.coerce.number().int().min(1).default(60),
  /** Failures older than this are forgotten. */
  SIGNIN_WINDOW_MINUTES: z.coerce.number().int().min(1).default(15),
  /** Proxies whose X-Forwarded-For is believed: comma-separated addresses or networks (10.0.0.0/8, ::1); none by default. */
  TRUSTED_PROXIES: z
    .string()
    .default('')
    .refine((v) => {
      try {
        parseTrustedProxies(v);
        return true;
      } catch {
        return false;
      }
    }, 'TRUSTED_PROXIES must be comma-separated IP addresses or networks such as 10.0.0.0/8 or fd00::/8'),
  /** Seconds after which the worker's heartbeat is reported stale by /api/health. */
  WORKER_STALE_SECONDS: z.coerce.number().int().min(5).default(60),
  UPLOAD_MAX_BYTES: z.coerce.number().int().min(1024).default(100 * 1024 * 1024),
  /** Longest row of an uploaded file, in characters (lib/ingest/limits.ts). */
  UPLOAD_MAX_LINE_CHARS: z.coerce.number().int().min(1024).default(64 * 1024),
  /** Most columns in an uploaded file's header. */
  UPLOAD_MAX_COLUMNS: z.coerce.number().int().min(10).default(1000),
  /** How often the worker's scheduler publishes, expires and reminds (seconds). */
  SCHEDULER_INTERVAL_SECONDS: z.coerce.number().int().min(1).max(3600).default(60),
  /** Largest JSON request body (lib/auth/same-origin.ts readJsonBody); larger ones are answered 413. */
  JSON_BODY_MAX_BYTES: z.coerce.number().int().min(1024).default(1024 * 1024),
  /**
   * Total defaults over a segment's window below which a fit's review says the likelihood estimate
   * is not informative and leads with the posterior of rho. The default is lib/stats/low-default.ts's
   * LOW_DEFAULT_THRESHOLD (not imported: this module is loaded everywhere, the engine need not be).
   */
  LOW_DEFAULT_THRESHOLD: z.coerce
    .number({ message: 'LOW_DEFAULT_THRESHOLD must be a whole number of defaults, such as 20' })
    .int('LOW_DEFAULT_THRESHOLD must be a whole number of defaults, such as 20')
    .min(1, 'LOW_DEFAULT_THRESHOLD must be at least 1 (a count of defaults)')
    .default(20),
  SMTP_URL: z.string().optional(),
  MAIL_FROM: z.string().default('Rhobook <rhobook@fenmoor.example>'),
});

export type Env = z.infer<typeof envSchema>;

let cached: Env | undefined;

/** Validates a set of environment variables (process.env by default); the error names each bad variable. */
export function parseEnv(source: Record<string, string | undefined> = process.env): Env {
  const parsed = envSchema.safeParse(source);
  if (!parsed.success) {
    const detail = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ');
    throw new Error(`Invalid environment configuration: ${detail}`);
  }
  return parsed.data;
}

export function env(): Env {
  if (!cached) cached = parseEnv(process.env);
  return cached;
}

/** Total defaults below which a fit's review leads with the posterior (LOW_DEFAULT_THRESHOLD). */
export function lowDefaultThreshold(): number {
  return env().LOW_DEFAULT_THRESHOLD;
}

/** The reading limits of an upload (lib/ingest's ReadOptions), from the configuration. */
export function uploadLimits(): { maxBytes: number; maxLineChars: number; maxColumns: number } {
  const e = env();
  return { maxBytes: e.UPLOAD_MAX_BYTES, maxLineChars: e.UPLOAD_MAX_LINE_CHARS, maxColumns: e.UPLOAD_MAX_COLUMNS };
}

/** An absolute link into the app (e-mails, webhooks, reports): NEXTAUTH_URL, or the development default. */
export function appUrl(path: string): string {
  const base = (env().NEXTAUTH_URL ?? 'http://127.0.0.1:3000').replace(/\/$/, '');
  return `${base}${path}`;
}
