/**
 * Rhobook's database schema: the single source of truth. Migrations in db/migrations are generated
 * from this file with `npm run db:generate` (drizzle-kit) and committed; `npm start` and `npm test`
 * apply them with drizzle-orm's migrator. Keep each change small: MariaDB DDL is not transactional.
 *
 * Sections: identity and access; worker heartbeat. Later features add their own sections below.
 */
import { sql } from 'drizzle-orm';
import {
  type AnyMySqlColumn,
  bigint,
  boolean,
  customType,
  date,
  datetime,
  double,
  index,
  int,
  json,
  mediumtext,
  mysqlEnum,
  mysqlTable,
  primaryKey,
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
    /**
     * Raised when the person signs out or their password changes: a session cookie carries the
     * version it was issued under and lib/auth/session.ts refuses it once the row moved on.
     */
    sessionVersion: int('session_version').notNull().default(0),
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

// ---------------------------------------------------------------------------------------------
// Assumptions (lib/assumptions, lib/dal/assumptions/): the library of correlation assumptions,
// their versions under maker-checker review, the append-only audit trail, API tokens and mail
// ---------------------------------------------------------------------------------------------

/**
 * The factor model an assumption's value was estimated under (lib/stats/fit-models.ts, FIT_MODELS:
 * the same list, checked by a unit test): years independent, or a persistent AR(1) factor.
 */
export const factorModels = ['independent', 'ar1'] as const;
export type FactorModel = (typeof factorModels)[number];
/**
 * The mixing law (copula) an assumption's value was estimated under: the one-factor Gaussian copula
 * (Vasicek) or the one-factor Student-t copula with nu degrees of freedom (lib/stats/estimators/t-copula-mle.ts).
 */
export const mixingLawKinds = ['gaussian', 't'] as const;
export type AssumptionMixingLaw = (typeof mixingLawKinds)[number];

/** DESIGN.md "Assumption lifecycle"; the transitions are in lib/assumptions/lifecycle.ts. */
export const assumptionStatuses = [
  'draft',
  'submitted',
  'in_review',
  'approved',
  'rejected',
  'published',
  'superseded',
  'expired',
  'retired',
] as const;
export type AssumptionStatus = (typeof assumptionStatuses)[number];

/** One assumption per segment; its content lives in versions. */
export const assumptions = mysqlTable(
  'assumptions',
  {
    id: int('id').autoincrement().primaryKey(),
    segment: varchar('segment', { length: 120 }).notNull(),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [uniqueIndex('assumptions_segment_uq').on(t.segment)],
);
export type Assumption = typeof assumptions.$inferSelect;

/**
 * A version of an assumption. Everything that ties it to its evidence (fit run, dataset hash,
 * engine version, seeds, the estimator's value and interval) is copied in when drafted and frozen;
 * a published version is never changed again except for its status (superseded, expired, retired).
 */
export const assumptionVersions = mysqlTable(
  'assumption_versions',
  {
    id: int('id').autoincrement().primaryKey(),
    assumptionId: int('assumption_id')
      .notNull()
      .references(() => assumptions.id, { onDelete: 'restrict' }),
    version: int('version').notNull(),
    status: mysqlEnum('status', assumptionStatuses).notNull().default('draft'),
    // Evidence, frozen at drafting.
    fitRunId: bigint('fit_run_id', { mode: 'number' }).references(() => fitRuns.id, { onDelete: 'restrict' }),
    datasetId: bigint('dataset_id', { mode: 'number' }).references(() => datasets.id, { onDelete: 'restrict' }),
    datasetSha256: varchar('dataset_sha256', { length: 64 }).notNull(),
    engineVersion: varchar('engine_version', { length: 60 }).notNull(),
    seeds: json('seeds').notNull(),
    estimator: varchar('estimator', { length: 40 }).notNull(),
    /** The factor model of the estimator (independent years or an AR(1) factor); versions drafted before it was kept are of the independent model. */
    factorModel: mysqlEnum('factor_model', factorModels).notNull().default('independent'),
    estimate: double('estimate').notNull(),
    intervalMethod: varchar('interval_method', { length: 20 }).notNull(),
    intervalLevel: double('interval_level').notNull(),
    intervalLower: double('interval_lower').notNull(),
    intervalUpper: double('interval_upper').notNull(),
    pd: double('pd').notNull(),
    windowFrom: varchar('window_from', { length: 20 }).notNull(),
    windowTo: varchar('window_to', { length: 20 }).notNull(),
    /** The definitions of default of the fitted years ({ definition, from, to, periods }[]); null for versions drafted before it was carried. */
    defaultDefinitions: json('default_definitions'),
    /** The priors of a posterior-median value ({ rho: "flat", pd: "beta:1,1" }); null for every other estimator. */
    prior: json('prior').$type<{ rho: string; pd: string }>(),
    /** The mixing law of the value; every version drafted before it was kept is Gaussian. */
    mixingLaw: mysqlEnum('mixing_law', mixingLawKinds).notNull().default('gaussian'),
    /** The degrees of freedom of a t-copula value; null for a Gaussian one. */
    nu: double('nu'),
    /** The profile-likelihood interval of nu ({ level, lower, upper }, an unbounded end null); null for a Gaussian value. */
    nuInterval: json('nu_interval').$type<{ level: number; lower: number | null; upper: number | null }>(),
    // The analyst's judgement.
    marginData: double('margin_data').notNull().default(0),
    marginDataRationale: text('margin_data_rationale').notNull(),
    marginPractice: double('margin_practice').notNull().default(0),
    marginPracticeRationale: text('margin_practice_rationale').notNull(),
    marginGeneral: double('margin_general').notNull().default(0),
    marginGeneralRationale: text('margin_general_rationale').notNull(),
    conservativeValue: double('conservative_value').notNull(),
    finalValue: double('final_value').notNull(),
    intendedUses: text('intended_uses').notNull(),
    limitations: text('limitations').notNull(),
    effectiveDate: date('effective_date', { mode: 'string' }).notNull(),
    reviewBy: date('review_by', { mode: 'string' }).notNull(),
    contentHash: varchar('content_hash', { length: 64 }).notNull(),
    // People and decisions.
    authorId: int('author_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    lastEditedBy: int('last_edited_by').references(() => users.id, { onDelete: 'restrict' }),
    validatorId: int('validator_id').references(() => users.id, { onDelete: 'restrict' }),
    decisionComment: text('decision_comment'),
    decidedAt: datetime('decided_at', { mode: 'date', fsp: 3 }),
    publishedAt: datetime('published_at', { mode: 'date', fsp: 3 }),
    endedAt: datetime('ended_at', { mode: 'date', fsp: 3 }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [
    uniqueIndex('assumption_versions_uq').on(t.assumptionId, t.version),
    index('assumption_versions_status_idx').on(t.status, t.effectiveDate),
  ],
);
export type AssumptionVersion = typeof assumptionVersions.$inferSelect;
export type NewAssumptionVersion = typeof assumptionVersions.$inferInsert;

/** A validator's review actions on a version; voided when the version is edited afterwards. */
export const assumptionReviews = mysqlTable(
  'assumption_reviews',
  {
    id: int('id').autoincrement().primaryKey(),
    versionId: int('version_id')
      .notNull()
      .references(() => assumptionVersions.id, { onDelete: 'restrict' }),
    reviewerId: int('reviewer_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    action: varchar('action', { length: 30 }).notNull(),
    comment: text('comment'),
    contentHash: varchar('content_hash', { length: 64 }).notNull(),
    voided: boolean('voided').notNull().default(false),
    at: datetime('at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index('assumption_reviews_version_idx').on(t.versionId)],
);
export type AssumptionReview = typeof assumptionReviews.$inferSelect;

/**
 * Append-only audit trail of every edit and transition (triggers in the migration refuse UPDATE
 * and DELETE). actor_id is null and actor_role 'system' for the scheduler.
 */
export const assumptionAudit = mysqlTable(
  'assumption_audit',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    assumptionId: int('assumption_id').notNull(),
    versionId: int('version_id').notNull(),
    version: int('version').notNull(),
    action: varchar('action', { length: 30 }).notNull(),
    actorId: int('actor_id'),
    actorEmail: varchar('actor_email', { length: 254 }).notNull(),
    actorRole: varchar('actor_role', { length: 20 }).notNull(),
    fromStatus: varchar('from_status', { length: 20 }),
    toStatus: varchar('to_status', { length: 20 }).notNull(),
    comment: text('comment'),
    contentHash: varchar('content_hash', { length: 64 }).notNull(),
    at: datetime('at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index('assumption_audit_assumption_idx').on(t.assumptionId, t.id), index('assumption_audit_version_idx').on(t.versionId)],
);
export type AssumptionAuditRow = typeof assumptionAudit.$inferSelect;

/** API tokens for downstream models: only the SHA-256 of the secret is stored. */
export const apiTokens = mysqlTable(
  'api_tokens',
  {
    id: int('id').autoincrement().primaryKey(),
    name: varchar('name', { length: 120 }).notNull(),
    prefix: varchar('prefix', { length: 16 }).notNull(),
    tokenHash: varchar('token_hash', { length: 64 }).notNull(),
    scopes: json('scopes').notNull(),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    expiresAt: datetime('expires_at', { mode: 'date', fsp: 3 }),
    lastUsedAt: datetime('last_used_at', { mode: 'date', fsp: 3 }),
    revokedAt: datetime('revoked_at', { mode: 'date', fsp: 3 }),
    revokedBy: int('revoked_by').references(() => users.id, { onDelete: 'restrict' }),
    /** The consuming model this token is for (lib/dal/models.ts), if any. */
    modelId: int('model_id').references((): AnyMySqlColumn => consumingModels.id, { onDelete: 'set null' }),
  },
  (t) => [uniqueIndex('api_tokens_hash_uq').on(t.tokenHash)],
);
export type ApiToken = typeof apiTokens.$inferSelect;

export const mailStatuses = ['pending', 'sent', 'failed'] as const;
export type MailStatus = (typeof mailStatuses)[number];

/**
 * Outgoing e-mail, written in the same transaction as the event it reports and sent by the
 * worker's mail loop with retries. dedupe_key makes reminders go out once each.
 */
export const mailOutbox = mysqlTable(
  'mail_outbox',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    kind: varchar('kind', { length: 40 }).notNull(),
    toAddress: varchar('to_address', { length: 254 }).notNull(),
    subject: varchar('subject', { length: 300 }).notNull(),
    body: text('body').notNull(),
    versionId: int('version_id'),
    dedupeKey: varchar('dedupe_key', { length: 160 }),
    status: mysqlEnum('status', mailStatuses).notNull().default('pending'),
    attempts: int('attempts').notNull().default(0),
    nextAttemptAt: datetime('next_attempt_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    lastError: text('last_error'),
    sentAt: datetime('sent_at', { mode: 'date', fsp: 3 }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [uniqueIndex('mail_outbox_dedupe_uq').on(t.dedupeKey), index('mail_outbox_due_idx').on(t.status, t.nextAttemptAt)],
);
export type MailOutboxRow = typeof mailOutbox.$inferSelect;

/** Messages received by the local capturing SMTP server (development and tests only). */
export const mailCaptured = mysqlTable(
  'mail_captured',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    outboxId: bigint('outbox_id', { mode: 'number' }),
    envelopeFrom: varchar('envelope_from', { length: 254 }).notNull(),
    envelopeTo: json('envelope_to').notNull(),
    raw: mediumtext('raw').notNull(),
    receivedAt: datetime('received_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index('mail_captured_outbox_idx').on(t.outboxId)],
);
export type MailCapturedRow = typeof mailCaptured.$inferSelect;

// ---------------------------------------------------------------------------------------------
// Datasets (data intake, DESIGN.md "Data the user brings"): segments, uploaded datasets, their compressed files, cohort rows, upload
// reports and waivers. A dataset is never edited in place: a correction is a newer upload that
// supersedes it. Fits and assumptions refer to datasets.id with ON DELETE RESTRICT, so a dataset
// in use cannot be deleted (lib/dal/datasets.ts maps errno 1451 to a 409).
// ---------------------------------------------------------------------------------------------

/** Asset classes of the supervisory benchmark (BCBS 2006, paras 272-273 and 328-330). */
export const assetClasses = [
  'corporate',
  'sme-corporate',
  'residential-mortgage',
  'qualifying-revolving',
  'other-retail',
  'none',
] as const;
export type AssetClass = (typeof assetClasses)[number];

export const datasetKinds = ['cohort', 'vintage', 'loans'] as const;
export type DatasetKind = (typeof datasetKinds)[number];

/** processing: a loan tape waiting for or in its conversion job; ready: usable; failed: the job failed for a reason other than the file's content. */
export const datasetStatuses = ['processing', 'ready', 'failed'] as const;
export type DatasetStatus = (typeof datasetStatuses)[number];

export const uploadStatuses = ['accepted', 'rejected', 'processing', 'failed'] as const;
export type UploadStatus = (typeof uploadStatuses)[number];

const longblob = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => 'longblob' });

export const segments = mysqlTable(
  'segments',
  {
    id: int('id').autoincrement().primaryKey(),
    name: varchar('name', { length: 120 }).notNull(),
    assetClass: mysqlEnum('asset_class', assetClasses).notNull().default('none'),
    /** Annual turnover in EUR millions, for the SME size adjustment (sme-corporate only). */
    turnoverEurMillions: double('turnover_eur_millions'),
    description: text('description'),
    ownerId: int('owner_id').references(() => users.id, { onDelete: 'set null' }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [uniqueIndex('segments_name_uq').on(t.name)],
);
export type Segment = typeof segments.$inferSelect;

export const datasets = mysqlTable(
  'datasets',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    kind: mysqlEnum('kind', datasetKinds).notNull(),
    name: varchar('name', { length: 160 }).notNull(),
    description: text('description'),
    /** SHA-256 of the raw uploaded bytes (lower-case hex). */
    sha256: varchar('sha256', { length: 64 }).notNull(),
    /** sha256 of (file hash, kind, conventions) while the dataset is live; NULL once failed, so the same bytes can be tried again. */
    dedupeKey: varchar('dedupe_key', { length: 64 }),
    status: mysqlEnum('status', datasetStatuses).notNull(),
    sizeBytes: bigint('size_bytes', { mode: 'number' }).notNull(),
    fileName: varchar('file_name', { length: 255 }).notNull(),
    uploadedBy: int('uploaded_by')
      .notNull()
      .references(() => users.id),
    /** Conversion conventions (loan tapes: reference date, exit convention, as-of; vintages: the rule) and their text. */
    conventions: json('conventions'),
    /** Vintage-years left out of the conversion because they were not observed for twelve months. */
    censored: json('censored'),
    /** The definition of default given at upload: rows that name none take it (lib/ingest/default-definition.ts). */
    defaultDefinition: text('default_definition'),
    segmentCount: int('segment_count').notNull().default(0),
    rowCount: int('row_count').notNull().default(0),
    warningCount: int('warning_count').notNull().default(0),
    supersededById: bigint('superseded_by_id', { mode: 'number' }).references((): AnyMySqlColumn => datasets.id, {
      onDelete: 'set null',
    }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    readyAt: datetime('ready_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [uniqueIndex('datasets_dedupe_uq').on(t.dedupeKey), index('datasets_sha256_idx').on(t.sha256)],
);
export type Dataset = typeof datasets.$inferSelect;

/** The raw uploaded file, gzip-compressed, in pieces of at most 4 MB (seq 0, 1, ...). */
export const datasetFiles = mysqlTable(
  'dataset_files',
  {
    datasetId: bigint('dataset_id', { mode: 'number' })
      .notNull()
      .references(() => datasets.id, { onDelete: 'cascade' }),
    seq: int('seq').notNull(),
    data: longblob('data').notNull(),
  },
  (t) => [primaryKey({ columns: [t.datasetId, t.seq] })],
);

export const cohortRows = mysqlTable(
  'cohort_rows',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    datasetId: bigint('dataset_id', { mode: 'number' })
      .notNull()
      .references(() => datasets.id, { onDelete: 'cascade' }),
    segmentId: int('segment_id')
      .notNull()
      .references(() => segments.id),
    period: int('period').notNull(),
    obligors: int('obligors').notNull(),
    defaults: int('defaults').notNull(),
    /** Physical line in the uploaded cohort file; NULL for rows converted from vintages or loans. */
    sourceLine: int('source_line'),
    defaultDefinition: text('default_definition'),
    note: text('note'),
  },
  (t) => [
    uniqueIndex('cohort_rows_dataset_segment_period_uq').on(t.datasetId, t.segmentId, t.period),
    index('cohort_rows_segment_idx').on(t.segmentId, t.period),
  ],
);
export type CohortRowRecord = typeof cohortRows.$inferSelect;

/** Every upload's validation report, accepted or rejected (a rejected upload stores only this). */
export const uploadReports = mysqlTable(
  'upload_reports',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    datasetId: bigint('dataset_id', { mode: 'number' }).references(() => datasets.id, { onDelete: 'set null' }),
    kind: mysqlEnum('kind', datasetKinds).notNull(),
    name: varchar('name', { length: 160 }).notNull(),
    fileName: varchar('file_name', { length: 255 }).notNull(),
    sha256: varchar('sha256', { length: 64 }),
    sizeBytes: bigint('size_bytes', { mode: 'number' }).notNull(),
    uploadedBy: int('uploaded_by')
      .notNull()
      .references(() => users.id),
    status: mysqlEnum('status', uploadStatuses).notNull(),
    errorCount: int('error_count').notNull().default(0),
    warningCount: int('warning_count').notNull().default(0),
    /** Stored findings (at most 1,000 per rule) as { line, column, rule, severity, value, message }[]. */
    findings: json('findings').notNull(),
    /** Counts by rule, including findings beyond the stored cap. */
    summary: json('summary').notNull(),
    jobId: bigint('job_id', { mode: 'number' }),
    message: varchar('message', { length: 500 }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    finishedAt: datetime('finished_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [index('upload_reports_dataset_idx').on(t.datasetId), index('upload_reports_user_idx').on(t.uploadedBy, t.createdAt)],
);
export type UploadReport = typeof uploadReports.$inferSelect;

/** A warning rule waived for a dataset, with the reason given. */
export const datasetWaivers = mysqlTable(
  'dataset_waivers',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    datasetId: bigint('dataset_id', { mode: 'number' })
      .notNull()
      .references(() => datasets.id, { onDelete: 'cascade' }),
    rule: varchar('rule', { length: 60 }).notNull(),
    reason: text('reason').notNull(),
    waivedBy: int('waived_by')
      .notNull()
      .references(() => users.id),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [uniqueIndex('dataset_waivers_rule_uq').on(t.datasetId, t.rule)],
);
export type DatasetWaiver = typeof datasetWaivers.$inferSelect;

// ---------------------------------------------------------------------------------------------
// Fit runs (lib/dal/fits.ts): one estimation request over a dataset, computed by a 'fit'
// job; the results are written in the transaction that marks the job succeeded. Everything needed
// to reproduce the numbers is kept: dataset hash, engine version, request (window, level) and seeds.
// ---------------------------------------------------------------------------------------------

export const fitRunStatuses = ['queued', 'running', 'succeeded', 'failed', 'cancelled'] as const;
export type FitRunStatus = (typeof fitRunStatuses)[number];

export const fitRuns = mysqlTable(
  'fit_runs',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    datasetId: bigint('dataset_id', { mode: 'number' })
      .notNull()
      .references(() => datasets.id, { onDelete: 'restrict' }),
    /** SHA-256 of the dataset's raw file when the fit was requested. */
    datasetSha256: varchar('dataset_sha256', { length: 64 }).notNull(),
    /** The validated request: segments, window, level, bootstrap and audit settings. */
    request: json('request').notNull(),
    engineVersion: varchar('engine_version', { length: 60 }).notNull(),
    /** { bootstrap: number | null, audit: number | null } */
    seeds: json('seeds').notNull(),
    jobId: bigint('job_id', { mode: 'number' }).references(() => jobs.id, { onDelete: 'set null' }),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id),
    /** Mirrors the job for lists; the job row is the live truth while it runs. */
    status: mysqlEnum('status', fitRunStatuses).notNull().default('queued'),
    /** { engine: { version }, segments: [...] } in the engine's per-segment shape (the CLI's `fit --json`). */
    results: json('results'),
    error: text('error'),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    finishedAt: datetime('finished_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [index('fit_runs_dataset_idx').on(t.datasetId), index('fit_runs_created_idx').on(t.createdAt), index('fit_runs_job_idx').on(t.jobId)],
);
export type FitRun = typeof fitRuns.$inferSelect;

// ---------------------------------------------------------------------------------------------
// Validation findings (lib/dal/findings.ts): what a validator records on a fit, a dataset or an
// assumption version, with its owner, due date and status; the history of each finding (status
// changes and comments) is append-only (triggers in the migration).
// ---------------------------------------------------------------------------------------------

export const findingTargets = ['fit', 'dataset', 'version'] as const;
export type FindingTarget = (typeof findingTargets)[number];
export const findingSeverities = ['high', 'medium', 'low'] as const;
export type FindingSeverity = (typeof findingSeverities)[number];
/** accepted: accepted with a rationale (the risk is taken knowingly). */
export const findingStatuses = ['open', 'in_remediation', 'remediated', 'accepted', 'closed'] as const;
export type FindingStatus = (typeof findingStatuses)[number];

export const findings = mysqlTable(
  'findings',
  {
    id: int('id').autoincrement().primaryKey(),
    targetType: mysqlEnum('target_type', findingTargets).notNull(),
    targetId: bigint('target_id', { mode: 'number' }).notNull(),
    title: varchar('title', { length: 200 }).notNull(),
    description: text('description').notNull(),
    severity: mysqlEnum('severity', findingSeverities).notNull(),
    ownerId: int('owner_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    dueDate: date('due_date', { mode: 'string' }).notNull(),
    status: mysqlEnum('status', findingStatuses).notNull().default('open'),
    /** Why the finding was accepted (status accepted). */
    rationale: text('rationale'),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index('findings_target_idx').on(t.targetType, t.targetId), index('findings_status_idx').on(t.status, t.dueDate)],
);
export type Finding = typeof findings.$inferSelect;

/** A finding's history: recorded, each status change and each comment, with who and when. */
export const findingEvents = mysqlTable(
  'finding_events',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    findingId: int('finding_id')
      .notNull()
      .references(() => findings.id, { onDelete: 'restrict' }),
    kind: varchar('kind', { length: 20 }).notNull(),
    actorId: int('actor_id'),
    actorEmail: varchar('actor_email', { length: 254 }).notNull(),
    fromStatus: varchar('from_status', { length: 20 }),
    toStatus: varchar('to_status', { length: 20 }),
    comment: text('comment'),
    at: datetime('at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index('finding_events_finding_idx').on(t.findingId, t.id)],
);
export type FindingEvent = typeof findingEvents.$inferSelect;

// ---------------------------------------------------------------------------------------------
// Evidence that ages (lib/dal/evidence.ts): the backtests of published values on the years of a
// newer dataset, computed by the worker's monitor-backtest job; and the institution's policy for
// values past their review-by date, whose changes are kept so that an as-of answer never changes.
// ---------------------------------------------------------------------------------------------

export const backtestStatuses = ['queued', 'done', 'failed'] as const;
export type BacktestStatus = (typeof backtestStatuses)[number];

export const evidenceBacktests = mysqlTable(
  'evidence_backtests',
  {
    id: int('id').autoincrement().primaryKey(),
    versionId: int('version_id')
      .notNull()
      .references(() => assumptionVersions.id, { onDelete: 'restrict' }),
    /** The newer dataset whose years are tested. */
    datasetId: bigint('dataset_id', { mode: 'number' })
      .notNull()
      .references(() => datasets.id, { onDelete: 'cascade' }),
    periods: json('periods').notNull(),
    status: mysqlEnum('status', backtestStatuses).notNull().default('queued'),
    /** lib/stats/backtest.ts BacktestResult, with the tested (p, rho). */
    result: json('result'),
    error: text('error'),
    engineVersion: varchar('engine_version', { length: 60 }),
    jobId: bigint('job_id', { mode: 'number' }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    finishedAt: datetime('finished_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [uniqueIndex('evidence_backtests_uq').on(t.versionId, t.datasetId)],
);
export type EvidenceBacktest = typeof evidenceBacktests.$inferSelect;

/** flag: past review-by a value stays readable, flagged overdue; withdraw: it is no longer served. */
export const overduePolicyKinds = ['flag', 'withdraw'] as const;
export type OverduePolicy = (typeof overduePolicyKinds)[number];

/** Every change of the overdue policy (the first row's absence means the default, flag). */
export const overduePolicyChanges = mysqlTable('overdue_policy_changes', {
  id: int('id').autoincrement().primaryKey(),
  policy: mysqlEnum('policy', overduePolicyKinds).notNull(),
  changedBy: int('changed_by')
    .notNull()
    .references(() => users.id, { onDelete: 'restrict' }),
  reason: text('reason').notNull(),
  at: datetime('at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
});
export type OverduePolicyChange = typeof overduePolicyChanges.$inferSelect;

// ---------------------------------------------------------------------------------------------
// Consuming models (lib/dal/models.ts): the register of downstream models that use published
// assumptions, the assumptions each uses, and the signed webhook deliveries that tell them of a
// publication, supersession, overdue value, withdrawal or retirement (an outbox: written in the
// transaction of the change, sent by the worker with retries).
// ---------------------------------------------------------------------------------------------

export const consumingModels = mysqlTable(
  'consuming_models',
  {
    id: int('id').autoincrement().primaryKey(),
    name: varchar('name', { length: 160 }).notNull(),
    ownerName: varchar('owner_name', { length: 120 }).notNull(),
    contactEmail: varchar('contact_email', { length: 254 }).notNull(),
    intendedUse: text('intended_use').notNull(),
    webhookUrl: varchar('webhook_url', { length: 500 }),
    /** The HMAC-SHA256 key of the model's webhooks: shown once when set, never answered again. */
    webhookSecret: varchar('webhook_secret', { length: 100 }),
    active: boolean('active').notNull().default(true),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [uniqueIndex('consuming_models_name_uq').on(t.name)],
);
export type ConsumingModel = typeof consumingModels.$inferSelect;

/** Which assumptions (segments) a model uses. */
export const consumingModelAssumptions = mysqlTable(
  'consuming_model_assumptions',
  {
    modelId: int('model_id')
      .notNull()
      .references(() => consumingModels.id, { onDelete: 'cascade' }),
    assumptionId: int('assumption_id')
      .notNull()
      .references(() => assumptions.id, { onDelete: 'restrict' }),
    addedBy: int('added_by')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    addedAt: datetime('added_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [primaryKey({ columns: [t.modelId, t.assumptionId] }), index('consuming_model_assumptions_assumption_idx').on(t.assumptionId)],
);

export const webhookStatuses = ['pending', 'delivered', 'failed'] as const;
export type WebhookStatus = (typeof webhookStatuses)[number];

export const webhookDeliveries = mysqlTable(
  'webhook_deliveries',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    /** Sent as X-Rhobook-Delivery; the same on every retry, so a receiver can drop duplicates. */
    deliveryId: varchar('delivery_id', { length: 36 }).notNull(),
    modelId: int('model_id')
      .notNull()
      .references(() => consumingModels.id, { onDelete: 'cascade' }),
    event: varchar('event', { length: 40 }).notNull(),
    versionId: int('version_id'),
    url: varchar('url', { length: 500 }).notNull(),
    /** The exact JSON body that is signed and sent. */
    body: mediumtext('body').notNull(),
    /** One delivery per model, version and event (an overdue value is told once per review-by date). */
    dedupeKey: varchar('dedupe_key', { length: 160 }),
    status: mysqlEnum('status', webhookStatuses).notNull().default('pending'),
    attempts: int('attempts').notNull().default(0),
    nextAttemptAt: datetime('next_attempt_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    lastError: text('last_error'),
    lastStatus: int('last_status'),
    deliveredAt: datetime('delivered_at', { mode: 'date', fsp: 3 }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [
    uniqueIndex('webhook_deliveries_delivery_uq').on(t.deliveryId),
    uniqueIndex('webhook_deliveries_dedupe_uq').on(t.dedupeKey),
    index('webhook_deliveries_due_idx').on(t.status, t.nextAttemptAt),
    index('webhook_deliveries_model_idx').on(t.modelId, t.id),
  ],
);
export type WebhookDelivery = typeof webhookDeliveries.$inferSelect;

/** What the local webhook receiver (app/api/webhook-receiver, while mail is captured locally) received. */
export const webhookCaptured = mysqlTable(
  'webhook_captured',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    deliveryId: varchar('delivery_id', { length: 36 }),
    modelId: int('model_id'),
    event: varchar('event', { length: 40 }),
    signatureValid: boolean('signature_valid').notNull(),
    body: mediumtext('body').notNull(),
    receivedAt: datetime('received_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index('webhook_captured_delivery_idx').on(t.deliveryId)],
);

/**
 * The segments of a fit run, each computed by a 'fit' job of its own so that any number of workers
 * share a run through the queue (lib/dal/fit-runs.ts). A segment's outcome (its result or why it
 * failed) is written in its job's completion transaction; the job that finds every segment done,
 * under the lock of the run's row, assembles the run's results, once.
 */
export const fitRunSegments = mysqlTable(
  'fit_run_segments',
  {
    fitRunId: bigint('fit_run_id', { mode: 'number' })
      .notNull()
      .references(() => fitRuns.id, { onDelete: 'cascade' }),
    /** Place among the run's segments (0-based), the order of the assembled results. */
    position: int('position').notNull(),
    segment: varchar('segment', { length: 200 }).notNull(),
    jobId: bigint('job_id', { mode: 'number' }).references(() => jobs.id, { onDelete: 'set null' }),
    /** { kind: 'fit', fit } or { kind: 'failed', failure } once the segment's job has finished. */
    outcome: json('outcome'),
    finishedAt: datetime('finished_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [primaryKey({ columns: [t.fitRunId, t.position] }), index('fit_run_segments_job_idx').on(t.jobId)],
);

// ---------------------------------------------------------------------------------------------
// Factor-correlation matrices (lib/factor-matrices, lib/dal/factor-matrices/): a published
// assumption of its own kind, the correlation matrix between segments' systematic factors from a
// fit's `pairs` block, under the same lifecycle as the segment assumptions (lib/assumptions/lifecycle.ts)
// ---------------------------------------------------------------------------------------------

/** One matrix assumption per set of segments (the key: the segments sorted and joined by a newline); its content lives in versions. */
export const factorMatrices = mysqlTable(
  'factor_matrices',
  {
    id: int('id').autoincrement().primaryKey(),
    /** The segments of the set, sorted and joined by "\n" (unique: one assumption per set). */
    segmentKey: varchar('segment_key', { length: 2700 }).notNull(),
    /** The segments as drafted first ([] of names), for display. */
    segments: json('segments').$type<string[]>().notNull(),
    /** SHA-256 of segmentKey, unique (a long key cannot be indexed whole). */
    keyHash: varchar('key_hash', { length: 64 }).notNull(),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [uniqueIndex('factor_matrices_key_uq').on(t.keyHash)],
);
export type FactorMatrix = typeof factorMatrices.$inferSelect;

/** One pair of a matrix version, frozen from the fit (lib/stats/factor-correlation.ts). */
export type FactorMatrixPair = {
  a: string;
  b: string;
  /** Maximum-likelihood r and the ends of its profile-likelihood interval at `level`. */
  r: number;
  lower: number;
  upper: number;
  level: number;
  /** The moment version (Pearson correlation of the implied factor series); null when undefined. */
  moment: number | null;
  /** The pair's common window. */
  periods: string[];
};

/**
 * A version of a matrix assumption: the evidence (fit run, dataset hash, engine version, seeds,
 * window, every pair with its interval, the estimated matrix and its nearest correlation matrix)
 * frozen at drafting, the analyst's margin and judgement, the value to use (a valid correlation
 * matrix), the decision. Same statuses and rules as assumption_versions.
 */
export const factorMatrixVersions = mysqlTable(
  'factor_matrix_versions',
  {
    id: int('id').autoincrement().primaryKey(),
    matrixId: int('matrix_id')
      .notNull()
      .references(() => factorMatrices.id, { onDelete: 'restrict' }),
    version: int('version').notNull(),
    status: mysqlEnum('status', assumptionStatuses).notNull().default('draft'),
    // Evidence, frozen at drafting.
    fitRunId: bigint('fit_run_id', { mode: 'number' }).references(() => fitRuns.id, { onDelete: 'restrict' }),
    datasetId: bigint('dataset_id', { mode: 'number' }).references(() => datasets.id, { onDelete: 'restrict' }),
    datasetSha256: varchar('dataset_sha256', { length: 64 }).notNull(),
    engineVersion: varchar('engine_version', { length: 60 }).notNull(),
    seeds: json('seeds').notNull(),
    windowFrom: varchar('window_from', { length: 20 }).notNull(),
    windowTo: varchar('window_to', { length: 20 }).notNull(),
    /** The segments in the order of the matrix rows. */
    segments: json('segments').$type<string[]>().notNull(),
    pairs: json('pairs').$type<FactorMatrixPair[]>().notNull(),
    /** The pairwise estimates as a matrix (1 on the diagonal). */
    estimated: json('estimated').$type<number[][]>().notNull(),
    smallestEigenvalue: double('smallest_eigenvalue').notNull(),
    /** Higham's nearest correlation matrix when `estimated` is not PSD, and the entry it moved most; else null. */
    nearest: json('nearest').$type<number[][]>(),
    largestChange: json('largest_change').$type<{ a: string; b: string; from: number; to: number }>(),
    // The analyst's judgement.
    /** A uniform add-on to the off-diagonal entries (>= 0) and its rationale. */
    margin: double('margin').notNull().default(0),
    marginRationale: text('margin_rationale').notNull(),
    /** The matrix to use: the base (nearest or estimated) plus the margin, checked valid. */
    value: json('value').$type<number[][]>().notNull(),
    valueSmallestEigenvalue: double('value_smallest_eigenvalue').notNull(),
    intendedUses: text('intended_uses').notNull(),
    limitations: text('limitations').notNull(),
    effectiveDate: date('effective_date', { mode: 'string' }).notNull(),
    reviewBy: date('review_by', { mode: 'string' }).notNull(),
    contentHash: varchar('content_hash', { length: 64 }).notNull(),
    // People and decisions.
    authorId: int('author_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    validatorId: int('validator_id').references(() => users.id, { onDelete: 'restrict' }),
    decisionComment: text('decision_comment'),
    decidedAt: datetime('decided_at', { mode: 'date', fsp: 3 }),
    publishedAt: datetime('published_at', { mode: 'date', fsp: 3 }),
    endedAt: datetime('ended_at', { mode: 'date', fsp: 3 }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [
    uniqueIndex('factor_matrix_versions_uq').on(t.matrixId, t.version),
    index('factor_matrix_versions_status_idx').on(t.status, t.effectiveDate),
  ],
);
export type FactorMatrixVersion = typeof factorMatrixVersions.$inferSelect;

/** Append-only audit trail of the matrix versions (triggers in the migration refuse UPDATE and DELETE). */
export const factorMatrixAudit = mysqlTable(
  'factor_matrix_audit',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    matrixId: int('matrix_id').notNull(),
    versionId: int('version_id').notNull(),
    version: int('version').notNull(),
    action: varchar('action', { length: 30 }).notNull(),
    actorId: int('actor_id'),
    actorEmail: varchar('actor_email', { length: 254 }).notNull(),
    actorRole: varchar('actor_role', { length: 20 }).notNull(),
    fromStatus: varchar('from_status', { length: 20 }),
    toStatus: varchar('to_status', { length: 20 }).notNull(),
    comment: text('comment'),
    contentHash: varchar('content_hash', { length: 64 }).notNull(),
    at: datetime('at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index('factor_matrix_audit_matrix_idx').on(t.matrixId, t.id), index('factor_matrix_audit_version_idx').on(t.versionId)],
);
export type FactorMatrixAuditRow = typeof factorMatrixAudit.$inferSelect;

// ---------------------------------------------------------------------------------------------
// The change stamp of what the consumer API reads (lib/dal/change-stamp.ts). Triggers in the
// migration count every row written to the tables an in-force answer is built from (the watched
// tables), in one row per database connection, so that writers never wait on one another; the
// stamp is the epoch and the sum of the counts plus those pruned. It changes with every commit
// that touches a watched table, in the same snapshot as the change, so a cached answer is served
// only while nothing it was built from has changed.
// ---------------------------------------------------------------------------------------------

/** Rows written to the watched tables, counted per database connection (the triggers' upsert). */
export const consumerChanges = mysqlTable('consumer_changes', {
  connectionId: bigint('connection_id', { mode: 'number', unsigned: true }).primaryKey(),
  n: bigint('n', { mode: 'number', unsigned: true }).notNull(),
  at: datetime('at', { mode: 'date', fsp: 6 }).notNull(),
});

/** One row: the database's epoch (new at every migration from empty and every restore) and the counts pruned so far. */
export const consumerChangeEpoch = mysqlTable('consumer_change_epoch', {
  id: int('id').primaryKey(),
  epoch: varchar('epoch', { length: 36 }).notNull(),
  pruned: bigint('pruned', { mode: 'number', unsigned: true }).notNull().default(0),
});
