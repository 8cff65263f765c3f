import 'server-only';
import { asc, count, desc, eq, inArray } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '@/db/client';
import {
  assumptionVersions,
  cohortRows,
  datasetKinds,
  datasets,
  datasetWaivers,
  fitRuns,
  jobs,
  segments,
  uploadReports,
  users,
  type AssetClass,
  type Dataset,
  type DatasetKind,
  type JobStatus,
  type UploadStatus,
} from '@/db/schema';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { can } from '@/lib/auth/permissions';
import { isDuplicateKeyError, isForeignKeyRestrictError } from '@/db/errors';
import { AppError, parseOrThrow } from '@/lib/errors';
import type { ReadOptions } from '@/lib/ingest/csv-reader';
import { parseIsoDate } from '@/lib/ingest/dates';
import { definitionSpans, describeSpans, type DefinitionSpan } from '@/lib/ingest/default-definition';
import { toIssue, type Finding, type FindingSummary, type UploadIssue } from '@/lib/ingest/findings';
import { gunzipSource } from '@/lib/ingest/gzip';
import {
  checkLoanTapeHeader,
  dedupeKeyOf,
  validateCohortOrVintage,
  type DatasetConventions,
  type UploadedFile,
} from '@/lib/ingest/upload';
import type { CensoredVintageYear } from '@/lib/ingest/vintage';
import { conversionFailureMessage } from '@/lib/jobs/kinds/convert-loans';
import {
  duplicateError,
  findDuplicate,
  linkSupersede,
  recordRejectedUpload,
  storeAcceptedDataset,
  storedGzipPieces,
  storeProcessingLoanTape,
  type UploadMeta,
} from './dataset-store';
import { releaseFailedIdentity } from './failed-conversions';
import { cancelJob } from '@/lib/jobs/queue';

/**
 * Datasets: uploads validated into versioned, immutable sets of annual cohort rows. Every function
 * takes the acting user first and checks the role here (pages and routes only decide what to show).
 *
 * Same bytes twice: an upload whose SHA-256 (with kind and, for loan tapes, conventions) matches a
 * live dataset is refused with 409 `conflict:duplicate-upload` naming that dataset (`datasetId`),
 * and nothing is stored. A dataset whose conversion failed no longer counts, so the file can be
 * tried again.
 */

export type EffectiveStatus = 'processing' | 'ready' | 'failed';

export type DatasetDto = {
  id: number;
  kind: DatasetKind;
  name: string;
  description: string | null;
  sha256: string;
  status: EffectiveStatus;
  sizeBytes: number;
  fileName: string;
  uploadedBy: { id: number; name: string };
  createdAt: string;
  readyAt: string | null;
  segmentCount: number;
  rowCount: number;
  warningCount: number;
  supersededBy: { id: number; name: string } | null;
  /** the conversion job of a loan tape */
  job: { id: number; status: JobStatus; progress: number; message: string | null; error: string | null } | null;
};

export type SegmentHistory = {
  segmentId: number;
  name: string;
  assetClass: AssetClass;
  rows: { period: number; obligors: number; defaults: number; sourceLine: number | null; defaultDefinition: string | null }[];
  /** The definitions of default over the segment's years (lib/ingest/default-definition.ts). */
  definitions: DefinitionSpan[];
};

export type WaiverDto = { rule: string; reason: string; by: string; at: string };

export type ReportDto = {
  id: number;
  datasetId: number | null;
  kind: DatasetKind;
  name: string;
  fileName: string;
  sha256: string | null;
  sizeBytes: number;
  status: UploadStatus;
  /** why a conversion failed or was cancelled (loan tapes), in a sentence */
  message: string | null;
  errorCount: number;
  warningCount: number;
  issues: UploadIssue[];
  summary: FindingSummary;
  uploadedBy: { id: number; name: string };
  createdAt: string;
  job: DatasetDto['job'];
};

export type DatasetDetailDto = DatasetDto & {
  conventions: DatasetConventions | null;
  /** The definition of default given at upload (rows that name none took it). */
  defaultDefinition: string | null;
  censored: CensoredVintageYear[];
  segments: SegmentHistory[];
  supersedes: { id: number; name: string }[];
  report: ReportDto | null;
  waivers: WaiverDto[];
  /** fit runs and assumption versions that refer to it (while any do, it cannot be deleted) */
  usedBy: { fits: number; assumptions: number };
  /** what the viewer may do with it */
  canManage: boolean;
  canDelete: boolean;
};

// ---------------------------------------------------------------------------------------------
// Reading
// ---------------------------------------------------------------------------------------------

type JobInfo = DatasetDto['job'];

async function jobsByDataset(ids: number[]): Promise<Map<number, NonNullable<JobInfo>>> {
  if (ids.length === 0) return new Map();
  const rows = await getDb()
    .select({
      datasetId: uploadReports.datasetId,
      id: jobs.id,
      status: jobs.status,
      progress: jobs.progress,
      message: jobs.message,
      error: jobs.error,
    })
    .from(uploadReports)
    .innerJoin(jobs, eq(jobs.id, uploadReports.jobId))
    .where(inArray(uploadReports.datasetId, ids));
  return new Map(rows.map((r) => [r.datasetId!, { id: r.id, status: r.status, progress: r.progress, message: r.message, error: r.error }]));
}

function effectiveStatus(d: Pick<Dataset, 'status'>, job: JobInfo): EffectiveStatus {
  if (d.status === 'processing' && job && (job.status === 'failed' || job.status === 'cancelled')) return 'failed';
  return d.status;
}

async function toDtos(rows: Dataset[]): Promise<DatasetDto[]> {
  const db = getDb();
  const userIds = [...new Set(rows.map((r) => r.uploadedBy))];
  const people = userIds.length ? await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, userIds)) : [];
  const peopleById = new Map(people.map((p) => [p.id, p]));
  const supIds = [...new Set(rows.map((r) => r.supersededById).filter((x): x is number => x !== null))];
  const sup = supIds.length ? await db.select({ id: datasets.id, name: datasets.name }).from(datasets).where(inArray(datasets.id, supIds)) : [];
  const supById = new Map(sup.map((s) => [s.id, s]));
  const jobMap = await jobsByDataset(rows.filter((r) => r.kind === 'loans').map((r) => r.id));
  return rows.map((r) => {
    const job = jobMap.get(r.id) ?? null;
    return {
      id: r.id,
      kind: r.kind,
      name: r.name,
      description: r.description,
      sha256: r.sha256,
      status: effectiveStatus(r, job),
      sizeBytes: r.sizeBytes,
      fileName: r.fileName,
      uploadedBy: peopleById.get(r.uploadedBy) ?? { id: r.uploadedBy, name: 'unknown' },
      createdAt: r.createdAt.toISOString(),
      readyAt: r.readyAt?.toISOString() ?? null,
      segmentCount: r.segmentCount,
      rowCount: r.rowCount,
      warningCount: r.warningCount,
      supersededBy: r.supersededById !== null ? supById.get(r.supersededById) ?? null : null,
      job,
    };
  });
}

export async function listDatasets(actor: SessionUser): Promise<DatasetDto[]> {
  assertCan(actor, 'datasets:read');
  const rows = await getDb().select().from(datasets).orderBy(desc(datasets.id)).limit(1000);
  return toDtos(rows);
}

async function loadDataset(actor: SessionUser, id: number): Promise<Dataset> {
  assertCan(actor, 'datasets:read');
  const [row] = await getDb().select().from(datasets).where(eq(datasets.id, id)).limit(1);
  if (!row) throw new AppError('not_found:dataset', 'There is no such dataset.');
  return row;
}

export async function getDatasetSummary(actor: SessionUser, id: number): Promise<DatasetDto> {
  const row = await loadDataset(actor, id);
  return (await toDtos([row]))[0];
}

async function reportDto(r: typeof uploadReports.$inferSelect): Promise<ReportDto> {
  const db = getDb();
  const [u] = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.id, r.uploadedBy));
  let job: JobInfo = null;
  if (r.jobId !== null) {
    const [j] = await db
      .select({ id: jobs.id, status: jobs.status, progress: jobs.progress, message: jobs.message, error: jobs.error })
      .from(jobs)
      .where(eq(jobs.id, r.jobId));
    job = j ?? null;
  }
  // Reports of conversions that failed before the give-up hook existed are still 'processing'.
  const failedJob = r.status === 'processing' && job !== null && (job.status === 'failed' || job.status === 'cancelled');
  return {
    id: r.id,
    datasetId: r.datasetId,
    kind: r.kind,
    name: r.name,
    fileName: r.fileName,
    sha256: r.sha256,
    sizeBytes: r.sizeBytes,
    status: failedJob ? 'failed' : r.status,
    message: r.message ?? (failedJob ? conversionFailureMessage(job!.status === 'cancelled' ? 'cancelled' : 'failed', job!.error) : null),
    errorCount: r.errorCount,
    warningCount: r.warningCount,
    issues: (r.findings as Finding[]).map(toIssue),
    summary: r.summary as FindingSummary,
    uploadedBy: u ?? { id: r.uploadedBy, name: 'unknown' },
    createdAt: r.createdAt.toISOString(),
    job,
  };
}

function mayManage(actor: SessionUser, d: Pick<Dataset, 'uploadedBy'>, what: 'manage' | 'delete'): boolean {
  if (!can(actor.role, 'datasets:manage')) return false;
  return what === 'manage' || actor.role === 'admin' || d.uploadedBy === actor.id;
}

export async function getDataset(actor: SessionUser, id: number): Promise<DatasetDetailDto> {
  const row = await loadDataset(actor, id);
  const db = getDb();
  const [base] = await toDtos([row]);
  const cohort = await db
    .select({
      segmentId: cohortRows.segmentId,
      name: segments.name,
      assetClass: segments.assetClass,
      period: cohortRows.period,
      obligors: cohortRows.obligors,
      defaults: cohortRows.defaults,
      sourceLine: cohortRows.sourceLine,
      defaultDefinition: cohortRows.defaultDefinition,
    })
    .from(cohortRows)
    .innerJoin(segments, eq(segments.id, cohortRows.segmentId))
    .where(eq(cohortRows.datasetId, id))
    .orderBy(asc(segments.name), asc(cohortRows.period));
  const bySegment = new Map<number, SegmentHistory>();
  for (const r of cohort) {
    let s = bySegment.get(r.segmentId);
    if (!s) bySegment.set(r.segmentId, (s = { segmentId: r.segmentId, name: r.name, assetClass: r.assetClass, rows: [], definitions: [] }));
    s.rows.push({ period: r.period, obligors: r.obligors, defaults: r.defaults, sourceLine: r.sourceLine, defaultDefinition: r.defaultDefinition });
  }
  for (const s of bySegment.values()) s.definitions = definitionSpans(s.rows.map((r) => ({ period: r.period, definition: r.defaultDefinition })));
  const supersedes = await db.select({ id: datasets.id, name: datasets.name }).from(datasets).where(eq(datasets.supersededById, id));
  const [rep] = await db.select().from(uploadReports).where(eq(uploadReports.datasetId, id)).orderBy(desc(uploadReports.id)).limit(1);
  const waivers = await db
    .select({ rule: datasetWaivers.rule, reason: datasetWaivers.reason, by: users.name, at: datasetWaivers.createdAt })
    .from(datasetWaivers)
    .innerJoin(users, eq(users.id, datasetWaivers.waivedBy))
    .where(eq(datasetWaivers.datasetId, id))
    .orderBy(asc(datasetWaivers.rule));
  const [[fitUse], [assumptionUse]] = await Promise.all([
    db.select({ n: count() }).from(fitRuns).where(eq(fitRuns.datasetId, id)),
    db.select({ n: count() }).from(assumptionVersions).where(eq(assumptionVersions.datasetId, id)),
  ]);
  return {
    ...base,
    usedBy: { fits: Number(fitUse?.n ?? 0), assumptions: Number(assumptionUse?.n ?? 0) },
    conventions: (row.conventions as DatasetConventions | null) ?? null,
    defaultDefinition: row.defaultDefinition,
    censored: (row.censored as CensoredVintageYear[] | null) ?? [],
    segments: [...bySegment.values()],
    supersedes,
    report: rep ? await reportDto(rep) : null,
    waivers: waivers.map((w) => ({ rule: w.rule, reason: w.reason, by: w.by, at: w.at.toISOString() })),
    canManage: mayManage(actor, row, 'manage'),
    canDelete: mayManage(actor, row, 'delete'),
  };
}

/**
 * An upload report. Reports attached to a dataset are readable by everyone who reads datasets; a
 * rejected upload's report only by its uploader and administrators (404 for others).
 */
export async function getUploadReport(actor: SessionUser, reportId: number): Promise<ReportDto> {
  assertCan(actor, 'datasets:read');
  const [r] = await getDb().select().from(uploadReports).where(eq(uploadReports.id, reportId)).limit(1);
  const visible = r && (r.datasetId !== null || r.uploadedBy === actor.id || actor.role === 'admin');
  if (!r || !visible) throw new AppError('not_found:report', 'There is no such upload report.');
  return reportDto(r);
}

/** The rows of a dataset as `segment,period,obligors,defaults`, with the conventions as comment lines. */
export async function getDatasetCohortsForExport(
  actor: SessionUser,
  id: number,
  segment?: string,
): Promise<{ fileBase: string; comments: string[]; rows: { segment: string; period: string; obligors: number; defaults: number }[] }> {
  const d = await getDataset(actor, id);
  if (d.status !== 'ready') throw new AppError('conflict:dataset-not-ready', 'This dataset has no cohort rows yet: its conversion has not finished.');
  const chosen = segment === undefined ? d.segments : d.segments.filter((s) => s.name === segment);
  if (segment !== undefined && chosen.length === 0) {
    throw new AppError('not_found:segment', `Dataset ${d.id} has no segment “${segment}”.`, { field: 'segment' });
  }
  const comments = [
    `Rhobook dataset ${d.id}: ${d.name} (${d.kind})`,
    `File ${d.fileName}, SHA-256 ${d.sha256}, uploaded ${d.createdAt.slice(0, 10)} by ${d.uploadedBy.name}`,
    `Conventions: ${d.conventions?.text ?? 'none recorded'}`,
    ...d.segments.map((s) => `Definition of default, ${s.name}: ${describeSpans(s.definitions) ?? 'not stated'}`),
  ];
  if (d.censored.length > 0) {
    comments.push(`Censored vintage-years (${d.censored.length}), left out of the cohorts:`);
    for (const c of d.censored) comments.push(`  ${c.segment} | vintage ${c.vintage} | year ${c.year} | ${c.reason}`);
  } else {
    comments.push('Censored: none');
  }
  if (d.supersededBy) comments.push(`Superseded by dataset ${d.supersededBy.id} (${d.supersededBy.name})`);
  if (segment !== undefined) comments.push(`Segment ${segment} only`);
  const rows = chosen.flatMap((s) => s.rows.map((r) => ({ segment: s.name, period: String(r.period), obligors: r.obligors, defaults: r.defaults })));
  const slug = segment === undefined ? '' : `-${segment.replace(/[^A-Za-z0-9_-]+/g, '_').slice(0, 60)}`;
  return { fileBase: `dataset-${d.id}-cohorts${slug}`, comments, rows };
}

/** The original file, still gzip-compressed, for download. */
export async function openDatasetFile(actor: SessionUser, id: number): Promise<{ fileName: string; pieces: AsyncIterable<Buffer> }> {
  const d = await loadDataset(actor, id);
  return { fileName: d.fileName, pieces: storedGzipPieces(getDb(), id) };
}

// ---------------------------------------------------------------------------------------------
// Uploading
// ---------------------------------------------------------------------------------------------

const optionalText = (max: number, message: string) =>
  z
    .string()
    .trim()
    .max(max, message)
    .optional()
    .transform((v) => (v ? v : undefined));

export const uploadFieldsSchema = z
  .object({
    kind: z.enum(datasetKinds, { message: 'Choose the kind of file: cohort, vintage or loans.' }),
    name: optionalText(160, 'Keep the name under 160 characters.'),
    description: optionalText(2000, 'Keep the description under 2,000 characters.'),
    supersedes: z
      .string()
      .trim()
      .optional()
      .transform((v) => (v ? Number(v) : undefined))
      .refine((v) => v === undefined || (Number.isInteger(v) && v > 0), 'Choose the dataset this upload replaces from the list.'),
    asOf: optionalText(10, 'Write the as-of date as YYYY-MM-DD.').refine(
      (v) => v === undefined || parseIsoDate(v) > 0,
      'The as-of date must be a calendar date written YYYY-MM-DD (the date up to which the tape is complete).',
    ),
    referenceMonthDay: optionalText(5, 'Write the reference date as MM-DD.').refine(
      (v) => v === undefined || (/^\d{2}-\d{2}$/.test(v) && v !== '02-29' && parseIsoDate(`2001-${v}`) > 0),
      'The reference date must be a month and day written MM-DD that exists every year (for example 01-01 or 07-01).',
    ),
    exitConvention: z.enum(['exits-stay', 'exits-removed'], { message: 'Choose exits-stay or exits-removed.' }).optional(),
    defaultDefinition: optionalText(500, 'Keep the definition of default under 500 characters.'),
  })
  .superRefine((v, ctx) => {
    if (v.kind !== 'loans') {
      for (const k of ['asOf', 'referenceMonthDay', 'exitConvention'] as const) {
        if (v[k] !== undefined) ctx.addIssue({ code: 'custom', path: [k], message: `${k} applies to loan-level tapes only; leave it out for a ${v.kind} file.` });
      }
    }
  });

/** Checked by the route before it reads the body, so a refused user's file is never read. */
export function assertMayUpload(actor: SessionUser): void {
  assertCan(actor, 'datasets:upload', 'Only analysts and administrators can upload data.');
}

export type UploadResult =
  | { status: 201; body: { id: number; kind: DatasetKind; status: 'ready'; segments: string[]; rows: number; sha256: string; warnings: UploadIssue[]; reportId: number } }
  | {
      status: 202;
      body: { id: number; kind: 'loans'; status: 'processing'; segments: string[]; rows: number; sha256: string; warnings: UploadIssue[]; reportId: number; jobId: number };
    };

function rejection(reportId: number, findings: Finding[], summary: FindingSummary): AppError {
  const first = findings.find((f) => f.severity === 'error');
  const where = first?.line ? ` (first: line ${first.line}, ${first.rule})` : first ? ` (first: ${first.rule})` : '';
  return new AppError(
    'invalid:upload',
    `The file was not accepted: ${summary.errors} error${summary.errors === 1 ? '' : 's'}${where}. Nothing was stored except this report; fix the file and upload it again.`,
    { issues: findings.map(toIssue), reportId, summary },
  );
}

async function checkSupersedeTarget(actor: SessionUser, olderId: number, field = 'supersedes'): Promise<Dataset> {
  const [older] = await getDb().select().from(datasets).where(eq(datasets.id, olderId));
  if (!older) throw new AppError('invalid:upload-form', `There is no dataset ${olderId} to supersede.`, { field });
  if (older.supersededById !== null) {
    throw new AppError('invalid:upload-form', `Dataset ${olderId} "${older.name}" is already superseded by dataset ${older.supersededById}.`, { field });
  }
  if (!mayManage(actor, older, 'manage')) throw new AppError('forbidden:datasets:manage', 'Your role does not allow superseding datasets.');
  return older;
}

/**
 * Stores an upload received by the route (lib/http/multipart.ts): validates cohort and vintage
 * files completely (201 or a 422 `invalid:upload` with every finding), checks a loan tape's header
 * and queues its conversion (202). Refuses the same upload twice (409). `limits` are the reading
 * limits of lib/ingest (size, line length, columns).
 */
export async function uploadDataset(
  actor: SessionUser,
  upload: { fields: Record<string, string>; file: UploadedFile | null },
  limits: ReadOptions,
): Promise<UploadResult> {
  assertMayUpload(actor);
  const f = parseOrThrow(uploadFieldsSchema, upload.fields, 'invalid:upload-form', 'The upload form is not valid.');
  const file = upload.file;
  if (!file) throw new AppError('invalid:upload-form', 'Attach a CSV file (a part named "file").', { field: 'file' });
  if (f.supersedes !== undefined) await checkSupersedeTarget(actor, f.supersedes);
  const meta: UploadMeta = {
    kind: f.kind,
    name: f.name ?? file.fileName.replace(/\.[A-Za-z0-9]{1,5}$/, '').slice(0, 160),
    description: f.description ?? null,
    fileName: file.fileName,
    sizeBytes: file.sizeBytes,
    sha256: file.sha256,
    uploadedBy: actor.id,
    loanOptions:
      f.kind === 'loans' ? { asOf: f.asOf, referenceMonthDay: f.referenceMonthDay, exitConvention: f.exitConvention ?? 'exits-stay' } : undefined,
    supersedes: f.supersedes ?? null,
    defaultDefinition: f.defaultDefinition ?? null,
  };
  const db = getDb();

  const key = dedupeKeyOf(meta);
  const existing = await findDuplicate(db, key);
  if (existing) {
    const [summary] = await toDtos((await db.select().from(datasets).where(eq(datasets.id, existing.id))) as Dataset[]);
    if (summary?.status === 'failed') await releaseFailedIdentity(db, [existing.id]);
    else throw duplicateError(existing);
  }

  if (meta.kind === 'loans') {
    const header = await checkLoanTapeHeader(gunzipSource(file.gzip()), limits);
    if (!header.ok) throw rejection(await recordRejectedUpload(db, meta, header), header.findings, header.summary);
    try {
      const stored = await db.transaction((tx) => storeProcessingLoanTape(tx, meta, file.gzip(), header));
      return {
        status: 202,
        body: {
          id: stored.id,
          kind: 'loans',
          status: 'processing',
          segments: [],
          rows: 0,
          sha256: meta.sha256,
          warnings: header.findings.filter((x) => x.severity === 'warning').map(toIssue),
          reportId: stored.reportId,
          jobId: stored.jobId,
        },
      };
    } catch (err) {
      if (isDuplicateKeyError(err)) {
        const again = await findDuplicate(db, key);
        if (again) throw duplicateError(again);
      }
      throw err;
    }
  }

  const v = await validateCohortOrVintage(meta.kind, gunzipSource(file.gzip()), limits);
  if (!v.ok) throw rejection(await recordRejectedUpload(db, meta, v), v.findings, v.summary);
  try {
    const stored = await db.transaction((tx) => storeAcceptedDataset(tx, meta, file.gzip(), v));
    return {
      status: 201,
      body: { id: stored.id, kind: meta.kind, status: 'ready', segments: stored.segments, rows: stored.rows, sha256: meta.sha256, warnings: stored.warnings, reportId: stored.reportId },
    };
  } catch (err) {
    if (isDuplicateKeyError(err)) {
      const again = await findDuplicate(db, key);
      if (again) throw duplicateError(again);
    }
    if (err instanceof AppError && err.code === 'invalid:upload') {
      // A check that needs the database (segment names that clash with existing ones).
      const issues = (err.details?.issues as UploadIssue[]) ?? [];
      const findings: Finding[] = [
        ...issues.map((i) => ({ line: i.row, column: i.column, rule: i.rule, severity: i.severity, value: i.value, message: i.message })),
        ...v.findings,
      ];
      const summary: FindingSummary = { ...v.summary, errors: v.summary.errors + issues.length };
      throw rejection(await recordRejectedUpload(db, meta, { findings, summary }), findings, summary);
    }
    throw err;
  }
}

// ---------------------------------------------------------------------------------------------
// Waivers, supersede, delete
// ---------------------------------------------------------------------------------------------

export const waiverSchema = z.object({
  rule: z.string().regex(/^[a-z0-9]+(-[a-z0-9]+)*$/, 'Name the warning rule to waive, for example tiny-cohort.'),
  reason: z.string().trim().min(10, 'Give a reason of at least 10 characters: it is kept with the dataset.').max(2000, 'Keep the reason under 2,000 characters.'),
});

/** Waives every warning of one rule on a dataset, with a reason that is stored and shown. */
export async function waiveWarnings(actor: SessionUser, datasetId: number, input: z.input<typeof waiverSchema>): Promise<WaiverDto[]> {
  assertCan(actor, 'datasets:manage', 'Only analysts and administrators can waive warnings.');
  const row = await loadDataset(actor, datasetId);
  const waiver = parseOrThrow(waiverSchema, input, 'invalid:waiver', 'The waiver is not valid.');
  const db = getDb();
  const [rep] = await db.select().from(uploadReports).where(eq(uploadReports.datasetId, row.id)).orderBy(desc(uploadReports.id)).limit(1);
  const summary = (rep?.summary as FindingSummary | undefined)?.byRule ?? {};
  const entry = summary[waiver.rule];
  if (!entry || entry.severity !== 'warning') {
    throw new AppError('invalid:waiver', `This dataset has no warning "${waiver.rule}" to waive. Errors cannot be waived.`, { field: 'rule' });
  }
  try {
    await db.insert(datasetWaivers).values({ datasetId: row.id, rule: waiver.rule, reason: waiver.reason, waivedBy: actor.id });
  } catch (err) {
    if (isDuplicateKeyError(err)) throw new AppError('conflict:waiver-exists', `The warning "${waiver.rule}" is already waived for this dataset.`);
    throw err;
  }
  return (await getDataset(actor, datasetId)).waivers;
}

/** Marks `olderId` as superseded by the newer dataset `newerId`. Neither dataset's content changes. */
export async function supersedeDataset(actor: SessionUser, olderId: number, newerId: number): Promise<DatasetDto> {
  assertCan(actor, 'datasets:manage', 'Only analysts and administrators can supersede datasets.');
  await loadDataset(actor, olderId);
  const newer = await loadDataset(actor, newerId).catch(() => {
    throw new AppError('invalid:supersede', `There is no dataset ${newerId} to supersede it with.`, { field: 'by' });
  });
  if (olderId === newerId) throw new AppError('invalid:supersede', 'A dataset cannot supersede itself.', { field: 'by' });
  const older = await checkSupersedeTarget(actor, olderId, 'by');
  if (newer.status !== 'ready') throw new AppError('invalid:supersede', `Dataset ${newerId} is not ready yet.`, { field: 'by' });
  if (newer.supersededById !== null) throw new AppError('invalid:supersede', `Dataset ${newerId} is itself superseded.`, { field: 'by' });
  if (newer.createdAt < older.createdAt) {
    throw new AppError('invalid:supersede', `Dataset ${newerId} was uploaded before dataset ${olderId}; only a newer upload can supersede.`, { field: 'by' });
  }
  await getDb().transaction(async (tx) => {
    const [locked] = await tx.select({ by: datasets.supersededById }).from(datasets).where(eq(datasets.id, olderId)).for('update');
    if (locked?.by !== null) throw new AppError('conflict:already-superseded', `Dataset ${olderId} was superseded meanwhile.`);
    await linkSupersede(tx, olderId, newerId);
  });
  return getDatasetSummary(actor, olderId);
}

/**
 * Deletes a dataset (its rows, file and waivers; its report is kept, detached). Refused with 409
 * when a fit or an assumption refers to it (their foreign keys are ON DELETE RESTRICT).
 */
export async function deleteDataset(actor: SessionUser, id: number): Promise<void> {
  assertCan(actor, 'datasets:manage', 'Only analysts and administrators can delete datasets.');
  const row = await loadDataset(actor, id);
  if (!mayManage(actor, row, 'delete')) {
    throw new AppError('forbidden:datasets:delete', 'Only the analyst who uploaded this dataset, or an administrator, can delete it.');
  }
  const db = getDb();
  if (row.status === 'processing') {
    // Stop its conversion first: a queued job is cancelled at once, a running one at its next
    // progress report (its give-up hook marks the report cancelled); no worker time is spent on it.
    const [rep] = await db.select({ jobId: uploadReports.jobId }).from(uploadReports).where(eq(uploadReports.datasetId, id)).limit(1);
    if (rep?.jobId) await cancelJob(db, rep.jobId).catch(() => undefined);
  }
  try {
    // Datasets it superseded become current again (ON DELETE SET NULL); its report is detached.
    await db.delete(datasets).where(eq(datasets.id, id));
  } catch (err) {
    if (isForeignKeyRestrictError(err)) {
      throw new AppError(
        'conflict:dataset-in-use',
        `Dataset ${id} "${row.name}" cannot be deleted: a fit or an assumption refers to it. Supersede it with a newer upload instead; the record of what was fitted must stay.`,
      );
    }
    throw err;
  }
}
