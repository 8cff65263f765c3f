/**
 * Rhobook's database schema: the single source of truth. Migrations in db/migrations are generated
 * from this file with `npm run db:generate` (drizzle-kit) and committed; `npm start` and `npm test`
 * apply them with drizzle-orm's migrator. Keep each change small: MariaDB DDL is not transactional.
 *
 * Sections: identity and access; worker heartbeat. Later features add their own sections below.
 */
import { sql } from 'drizzle-orm';
import {
  bigint,
  boolean,
  datetime,
  index,
  int,
  json,
  mysqlEnum,
  mysqlTable,
  text,
  uniqueIndex,
  varchar,
} from 'drizzle-orm/mysql-core';

export const roles = ['viewer', 'analyst', 'validator', 'admin'] as const;
export type Role = (typeof roles)[number];

// ---------------------------------------------------------------------------------------------
// Identity and access
// ---------------------------------------------------------------------------------------------

export const users = mysqlTable(
  'users',
  {
    id: int('id').autoincrement().primaryKey(),
    email: varchar('email', { length: 254 }).notNull(),
    name: varchar('name', { length: 120 }).notNull(),
    role: mysqlEnum('role', roles).notNull(),
    passwordHash: varchar('password_hash', { length: 100 }).notNull(),
    active: boolean('active').notNull().default(true),
    /** Set when an admin created the account with an invitation instead of a password. */
    mustChangePassword: boolean('must_change_password').notNull().default(false),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [uniqueIndex('users_email_uq').on(t.email)],
);
export type User = typeof users.$inferSelect;
export type NewUser = typeof users.$inferInsert;

/**
 * Append-only log of administrative changes (user created, role changed, deactivated, token
 * created or revoked). Triggers in the migration refuse UPDATE and DELETE.
 */
export const adminAudit = mysqlTable(
  'admin_audit',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    actorId: int('actor_id'),
    actorEmail: varchar('actor_email', { length: 254 }).notNull(),
    action: varchar('action', { length: 60 }).notNull(),
    targetType: varchar('target_type', { length: 40 }).notNull(),
    targetId: varchar('target_id', { length: 64 }).notNull(),
    before: json('before'),
    after: json('after'),
    at: datetime('at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index('admin_audit_target_idx').on(t.targetType, t.targetId)],
);
export type AdminAuditRow = typeof adminAudit.$inferSelect;

/** Failed sign-in attempts, kept for the rate limit (by e-mail and by client address). */
export const signInFailures = mysqlTable(
  'sign_in_failures',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    email: varchar('email', { length: 254 }).notNull(),
    clientAddress: varchar('client_address', { length: 64 }).notNull(),
    at: datetime('at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index('sign_in_failures_email_idx').on(t.email, t.at), index('sign_in_failures_addr_idx').on(t.clientAddress, t.at)],
);

// ---------------------------------------------------------------------------------------------
// Worker heartbeat
// ---------------------------------------------------------------------------------------------

export const workerHeartbeats = mysqlTable('worker_heartbeats', {
  workerId: varchar('worker_id', { length: 80 }).primaryKey(),
  host: varchar('host', { length: 120 }).notNull(),
  pid: int('pid').notNull(),
  startedAt: datetime('started_at', { mode: 'date', fsp: 3 }).notNull(),
  lastBeatAt: datetime('last_beat_at', { mode: 'date', fsp: 3 }).notNull(),
  stoppedAt: datetime('stopped_at', { mode: 'date', fsp: 3 }),
});
export type WorkerHeartbeat = typeof workerHeartbeats.$inferSelect;

// ---------------------------------------------------------------------------------------------
// Job queue (lib/jobs/queue.ts): claimed with SELECT ... FOR UPDATE SKIP LOCKED, leased, retried
// ---------------------------------------------------------------------------------------------

export const jobStatuses = ['queued', 'running', 'succeeded', 'failed', 'cancelled'] as const;
export type JobStatus = (typeof jobStatuses)[number];

export const jobs = mysqlTable(
  'jobs',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    kind: varchar('kind', { length: 40 }).notNull(),
    payload: json('payload').notNull(),
    status: mysqlEnum('status', jobStatuses).notNull().default('queued'),
    progress: int('progress').notNull().default(0),
    message: varchar('message', { length: 300 }),
    attempts: int('attempts').notNull().default(0),
    maxAttempts: int('max_attempts').notNull().default(3),
    leaseExpiresAt: datetime('lease_expires_at', { mode: 'date', fsp: 3 }),
    workerId: varchar('worker_id', { length: 80 }),
    error: text('error'),
    cancelRequested: boolean('cancel_requested').notNull().default(false),
    result: json('result'),
    createdBy: int('created_by'),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    startedAt: datetime('started_at', { mode: 'date', fsp: 3 }),
    finishedAt: datetime('finished_at', { mode: 'date', fsp: 3 }),
    updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index('jobs_claim_idx').on(t.status, t.kind, t.id), index('jobs_lease_idx').on(t.status, t.leaseExpiresAt)],
);
export type Job = typeof jobs.$inferSelect;
