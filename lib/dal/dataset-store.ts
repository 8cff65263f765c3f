import 'server-only';
/**
 * Storing uploads as datasets: the database side of data intake, shared by the data access layer's
 * upload (lib/dal/datasets.ts, which authorises), the loan-tape conversion job (workers/handlers)
 * and the demo seed. Nothing here checks who the caller is: callers do.
 *
 * What is written, and when (DESIGN.md, "Data the user brings"):
 * - A rejected upload writes one `upload_reports` row (status rejected, its findings) and nothing else.
 * - An accepted cohort or vintage file writes, in ONE transaction: the segments it names (new ones
 *   only), the dataset (sha256, size, conventions, censored list), the gzip-compressed file, its
 *   cohort rows and its report.
 * - A loan tape that passes the header check writes the dataset (status processing), the file, the
 *   report (processing) and a `convert-loans` job in one transaction; the job later writes the
 *   cohort rows, or deletes the dataset and keeps only the rejected report.
 */
import { and, count, eq, sql } from 'drizzle-orm';
import type { DbOrTx, Tx } from '@/db/connection';
import { cohortRows, datasetFiles, datasets, segments, uploadReports, type Dataset, type DatasetKind } from '@/db/schema';
import { AppError } from '@/lib/errors';
import type { CohortRow } from '@/lib/ingest/cohort';
import type { ByteSource } from '@/lib/ingest/csv-reader';
import { toIssue, type UploadIssue } from '@/lib/ingest/findings';
import { gunzipSource } from '@/lib/ingest/gzip';
import { dedupeKeyOf, type HeaderCheck, type LoanOptions, type Validated } from '@/lib/ingest/upload';
import { CONVERT_LOANS_JOB } from '@/lib/jobs/kinds/convert-loans';
import { enqueueJob } from '@/lib/jobs/queue';

/** Largest piece of the compressed file stored in one row. */
export const FILE_PIECE_BYTES = 4 * 1024 * 1024;

/** What is stored with an upload besides its content. */
export type UploadMeta = {
  kind: DatasetKind;
  name: string;
  description: string | null;
  fileName: string;
  sizeBytes: number;
  sha256: string;
  uploadedBy: number;
  /** loan tapes only */
  loanOptions?: LoanOptions;
  /** id of an older dataset this upload supersedes once accepted */
  supersedes?: number | null;
  /** The definition of default given at upload; rows that name none take it. */
  defaultDefinition?: string | null;
};

/** The compressed file, in pieces of any size (an upload's temporary file, or one buffer). */
export type GzipPieces = AsyncIterable<Uint8Array> | Iterable<Uint8Array>;

/** Re-cuts the compressed file into pieces of FILE_PIECE_BYTES (the last may be shorter), holding at most two at a time. */
async function* filePieces(gz: GzipPieces): AsyncGenerator<Buffer> {
  let held: Buffer[] = [];
  let heldBytes = 0;
  let any = false;
  for await (const chunk of gz) {
    held.push(Buffer.from(chunk.buffer, chunk.byteOffset, chunk.byteLength));
    heldBytes += chunk.byteLength;
    while (heldBytes >= FILE_PIECE_BYTES) {
      const all = Buffer.concat(held);
      any = true;
      yield all.subarray(0, FILE_PIECE_BYTES);
      const rest = all.subarray(FILE_PIECE_BYTES);
      held = rest.length > 0 ? [rest] : [];
      heldBytes = rest.length;
    }
  }
  if (heldBytes > 0 || !any) yield Buffer.concat(held);
}

async function insertFile(tx: DbOrTx, datasetId: number, gz: GzipPieces): Promise<void> {
  let seq = 0;
  for await (const data of filePieces(gz)) await tx.insert(datasetFiles).values({ datasetId, seq: seq++, data });
}

/** The stored file of a dataset as a stream of raw (decompressed) bytes. */
export function storedFileSource(db: DbOrTx, datasetId: number): ByteSource {
  return gunzipSource(storedGzipPieces(db, datasetId));
}

/** The stored file of a dataset, still gzip-compressed, piece by piece (one row read at a time). */
export async function* storedGzipPieces(db: DbOrTx, datasetId: number): AsyncGenerator<Buffer> {
  const [{ n }] = await db.select({ n: count() }).from(datasetFiles).where(eq(datasetFiles.datasetId, datasetId));
  if (Number(n) === 0) throw new AppError('not_found:dataset-file', `Dataset ${datasetId} has no stored file.`);
  for (let seq = 0; seq < Number(n); seq++) {
    const [row] = await db
      .select({ data: datasetFiles.data })
      .from(datasetFiles)
      .where(and(eq(datasetFiles.datasetId, datasetId), eq(datasetFiles.seq, seq)));
    if (!row) throw new AppError('internal:dataset-file', `Piece ${seq} of dataset ${datasetId}'s file is missing.`);
    yield row.data;
  }
}

/** The live dataset with the same identity (see dedupeKeyOf), if any. */
export async function findDuplicate(db: DbOrTx, key: string): Promise<{ id: number; name: string; createdAt: Date } | null> {
  const [row] = await db
    .select({ id: datasets.id, name: datasets.name, createdAt: datasets.createdAt })
    .from(datasets)
    .where(eq(datasets.dedupeKey, key))
    .limit(1);
  return row ?? null;
}

export function duplicateError(existing: { id: number; name: string; createdAt: Date }): AppError {
  return new AppError(
    'conflict:duplicate-upload',
    `This file was already uploaded as dataset ${existing.id} "${existing.name}" on ${existing.createdAt.toISOString().slice(0, 10)}. Open that dataset instead; a file is stored once.`,
    { datasetId: existing.id },
  );
}

/**
 * Finds or creates the named segments (new ones owned by `ownerId`) and returns name -> id.
 * Segment names compare without regard to case and accents (the table's collation): two spellings
 * of one name in the same upload are an error, because their rows would be merged silently.
 */
export async function ensureSegments(tx: DbOrTx, names: readonly string[], ownerId: number | null): Promise<Map<string, number>> {
  const unique = [...new Set(names)];
  const out = new Map<string, number>();
  if (unique.length === 0) return out;
  for (let i = 0; i < unique.length; i += 500) {
    const part = unique.slice(i, i + 500);
    await tx
      .insert(segments)
      .values(part.map((name) => ({ name, ownerId })))
      .onDuplicateKeyUpdate({ set: { name: sql`${segments.name}` } });
  }
  const bySpelling = new Map<number, string>();
  for (const name of unique) {
    const [row] = await tx.select({ id: segments.id }).from(segments).where(eq(segments.name, name)).limit(1);
    if (!row) throw new Error(`Segment "${name}" was not found after it was inserted.`);
    const other = bySpelling.get(row.id);
    if (other !== undefined) {
      throw new AppError('invalid:upload', `The segment names "${other}" and "${name}" differ only in case or accents.`, {
        issues: [
          {
            row: null,
            column: 'segment',
            rule: 'segment-name-clash',
            severity: 'error',
            value: name,
            message: `The segment names "${other}" and "${name}" differ only in upper/lower case or accents, so Rhobook would treat them as one segment. Use one spelling for each segment.`,
          } satisfies UploadIssue,
        ],
      });
    }
    bySpelling.set(row.id, name);
    out.set(name, row.id);
  }
  return out;
}

async function insertCohortRows(
  tx: DbOrTx,
  datasetId: number,
  rows: readonly CohortRow[],
  segmentIds: Map<string, number>,
  defaultDefinition: string | null,
): Promise<void> {
  for (let i = 0; i < rows.length; i += 1000) {
    await tx.insert(cohortRows).values(
      rows.slice(i, i + 1000).map((r) => ({
        datasetId,
        segmentId: segmentIds.get(r.segment)!,
        period: Number(r.period),
        obligors: r.obligors,
        defaults: r.defaults,
        sourceLine: r.line,
        defaultDefinition: r.defaultDefinition ?? defaultDefinition,
        note: r.note ?? null,
      })),
    );
  }
}

/** Marks `olderId` as superseded by `newerId` (checked by the caller). */
export async function linkSupersede(tx: DbOrTx, olderId: number, newerId: number): Promise<void> {
  await tx.update(datasets).set({ supersededById: newerId }).where(eq(datasets.id, olderId));
}

export type StoredDataset = { id: number; reportId: number; segments: string[]; rows: number; warnings: UploadIssue[] };

/** The dataset row of an upload as it arrives (the same for every kind). */
function datasetOf(meta: UploadMeta) {
  return {
    kind: meta.kind,
    name: meta.name,
    description: meta.description,
    sha256: meta.sha256,
    dedupeKey: dedupeKeyOf(meta),
    sizeBytes: meta.sizeBytes,
    fileName: meta.fileName,
    uploadedBy: meta.uploadedBy,
    defaultDefinition: meta.defaultDefinition ?? null,
  };
}

/** A dataset whose cohort rows are stored: at upload (cohort, vintage) or when its conversion ends (loans). */
function readyOf(v: Validated, segmentCount: number) {
  return {
    status: 'ready' as const,
    conventions: v.conventions,
    censored: v.censored,
    segmentCount,
    rowCount: v.cohortRows.length,
    warningCount: v.summary.warnings,
    readyAt: new Date(),
  };
}

/** The upload report row of an upload as it arrives. */
function reportOf(meta: Omit<UploadMeta, 'sha256'> & { sha256: string | null }, datasetId: number | null) {
  return {
    datasetId,
    kind: meta.kind,
    name: meta.name,
    fileName: meta.fileName,
    sha256: meta.sha256,
    sizeBytes: meta.sizeBytes,
    uploadedBy: meta.uploadedBy,
  };
}

/** A report's outcome: its findings and counts, finished now. */
function outcomeOf(status: 'accepted' | 'rejected', v: Pick<Validated, 'findings' | 'summary'>) {
  return {
    status,
    errorCount: v.summary.errors,
    warningCount: v.summary.warnings,
    findings: v.findings,
    summary: v.summary,
    finishedAt: new Date(),
  };
}

/** Writes an accepted cohort or vintage upload (call inside a transaction). */
export async function storeAcceptedDataset(tx: DbOrTx, meta: UploadMeta, gz: GzipPieces, v: Validated): Promise<StoredDataset> {
  const names = [...new Set(v.cohortRows.map((r) => r.segment))].sort();
  const segmentIds = await ensureSegments(tx, names, meta.uploadedBy);
  const [res] = await tx.insert(datasets).values({ ...datasetOf(meta), ...readyOf(v, names.length) });
  const id = Number(res.insertId);
  await insertFile(tx, id, gz);
  await insertCohortRows(tx, id, v.cohortRows, segmentIds, meta.defaultDefinition ?? null);
  const [rep] = await tx.insert(uploadReports).values({ ...reportOf(meta, id), ...outcomeOf('accepted', v) });
  if (meta.supersedes) await linkSupersede(tx, meta.supersedes, id);
  return {
    id,
    reportId: Number(rep.insertId),
    segments: names,
    rows: v.cohortRows.length,
    warnings: v.findings.filter((f) => f.severity === 'warning').map(toIssue),
  };
}

/** Writes a loan tape waiting for its conversion job (call inside a transaction). */
export async function storeProcessingLoanTape(
  tx: Tx,
  meta: UploadMeta,
  gz: GzipPieces,
  header: HeaderCheck,
): Promise<{ id: number; reportId: number; jobId: number }> {
  const [res] = await tx.insert(datasets).values({
    ...datasetOf(meta),
    status: 'processing',
    conventions: { text: 'Conversion pending.', ...meta.loanOptions },
    censored: [],
  });
  const id = Number(res.insertId);
  await insertFile(tx, id, gz);
  const [rep] = await tx.insert(uploadReports).values({
    ...reportOf(meta, id),
    status: 'processing',
    errorCount: 0,
    warningCount: header.summary.warnings,
    findings: header.findings,
    summary: header.summary,
  });
  const reportId = Number(rep.insertId);
  const jobId = await enqueueJob(tx, {
    kind: CONVERT_LOANS_JOB,
    payload: { datasetId: id, reportId, supersedes: meta.supersedes ?? null, ...meta.loanOptions },
    createdBy: meta.uploadedBy,
  });
  await tx.update(uploadReports).set({ jobId }).where(eq(uploadReports.id, reportId));
  return { id, reportId, jobId };
}

/** Records a rejected upload: its report, and nothing else. */
export async function recordRejectedUpload(
  db: DbOrTx,
  meta: Omit<UploadMeta, 'sha256'> & { sha256: string | null },
  v: Pick<Validated, 'findings' | 'summary'>,
): Promise<number> {
  const [rep] = await db.insert(uploadReports).values({ ...reportOf(meta, null), ...outcomeOf('rejected', v) });
  return Number(rep.insertId);
}

/** The loan tape a convert-loans job is to convert: refused (permanently) when gone or no longer waiting. */
export async function loadConvertibleDataset(db: DbOrTx, datasetId: number): Promise<Dataset> {
  const [ds] = await db.select().from(datasets).where(eq(datasets.id, datasetId));
  if (!ds) throw new AppError('invalid:dataset-missing', `Dataset ${datasetId} no longer exists; nothing to convert.`);
  if (ds.status !== 'processing') {
    throw new AppError('invalid:dataset-state', `Dataset ${datasetId} is ${ds.status}, not waiting for conversion.`);
  }
  return ds;
}

/**
 * Writes the result of a loan-tape conversion (inside the job's completion transaction): the cohort
 * rows and a ready dataset, or, for a rejected tape, the rejected report alone (the dataset and its
 * file are deleted).
 */
export async function writeLoanConversion(
  tx: DbOrTx,
  input: { datasetId: number; reportId: number; supersedes: number | null; validated: Validated },
): Promise<{ status: 'accepted' | 'rejected'; rows: number; errors: number; warnings: number }> {
  const { datasetId, reportId, validated: v } = input;
  const [ds] = await tx.select().from(datasets).where(eq(datasets.id, datasetId)).for('update');
  if (!ds) throw new AppError('invalid:dataset-missing', `Dataset ${datasetId} was deleted before its conversion finished.`);
  if (!v.ok) {
    await tx
      .update(uploadReports)
      .set({ ...outcomeOf('rejected', v), datasetId: null })
      .where(eq(uploadReports.id, reportId));
    await tx.delete(datasets).where(eq(datasets.id, datasetId));
    return { status: 'rejected', rows: 0, errors: v.summary.errors, warnings: v.summary.warnings };
  }
  const names = [...new Set(v.cohortRows.map((r) => r.segment))].sort();
  const segmentIds = await ensureSegments(tx, names, ds.uploadedBy);
  await tx.delete(cohortRows).where(eq(cohortRows.datasetId, datasetId));
  await insertCohortRows(tx, datasetId, v.cohortRows, segmentIds, ds.defaultDefinition);
  await tx.update(datasets).set(readyOf(v, names.length)).where(eq(datasets.id, datasetId));
  await tx.update(uploadReports).set(outcomeOf('accepted', v)).where(eq(uploadReports.id, reportId));
  if (input.supersedes) {
    const [older] = await tx.select({ id: datasets.id, by: datasets.supersededById }).from(datasets).where(eq(datasets.id, input.supersedes));
    if (older && older.by === null) await linkSupersede(tx, older.id, datasetId);
  }
  return { status: 'accepted', rows: v.cohortRows.length, errors: 0, warnings: v.summary.warnings };
}
