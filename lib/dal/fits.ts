import 'server-only';
import { asc, desc, eq, inArray, sql } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { cohortRows, datasets, fitRuns, jobs, segments, users, type FitRunStatus } from '@/db/schema';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { AppError, parseOrThrow } from '@/lib/errors';
import { loadFittableDataset, loadPanels } from './panels';
import { fitRequestSchema, type FitRequest, type FitRequestInput } from '@/lib/fits/request';
import { findSegment, isCurrentResults, type FitResults, type FitSegmentResult } from '@/lib/fits/results';
import { FIT_JOB } from '@/lib/jobs/kinds/fit';
import { cancelJob, enqueueJob } from '@/lib/jobs/queue';
import { ENGINE_VERSION } from '@/lib/stats/version';

/**
 * Fit runs. Who may do what (lib/auth/permissions.ts): every signed-in role reads fits; analysts and
 * validators run them (viewers and administrators may not). A fit may only be requested on a dataset
 * that exists and is ready; anything else is answered 404 (datasets are visible to every role of the
 * organisation, so "a dataset the user may not see" is a missing, deleted or unusable one). Only the
 * person who started a run may cancel it.
 */

export type FitSummaryDto = {
  id: number;
  status: FitRunStatus;
  progress: number;
  message: string | null;
  datasetId: number;
  datasetName: string;
  segments: string[];
  createdBy: string;
  createdAt: string;
  finishedAt: string | null;
  /** Finished with results in the current layout: it can be compared with other runs of a shared segment. */
  comparable: boolean;
};

export type FitDto = FitSummaryDto & {
  request: FitRequest;
  results: FitResults | null;
  error: string | null;
  datasetSha256: string;
  engineVersion: string;
  seeds: { bootstrap: number | null; audit: number | null };
  jobId: number | null;
  mayCancel: boolean;
};

type Row = {
  run: typeof fitRuns.$inferSelect;
  job: { status: FitRunStatus; progress: number; message: string | null; error: string | null } | null;
  datasetName: string;
  createdBy: string;
};

function liveStatus(r: Row): { status: FitRunStatus; progress: number; message: string | null; error: string | null } {
  if (r.run.status === 'succeeded') return { status: 'succeeded', progress: 100, message: 'Finished', error: null };
  if (!r.job) return { status: r.run.status, progress: 0, message: null, error: r.run.error };
  return { status: r.job.status === 'succeeded' ? 'failed' : r.job.status, progress: r.job.progress, message: r.job.message, error: r.job.error };
}

function segmentsOf(r: Row): string[] {
  const results = r.run.results as FitResults | null;
  if (results?.segments) return results.segments.map((s) => s.segment);
  return (r.run.request as FitRequest).segments ?? [];
}

function toSummary(r: Row): FitSummaryDto {
  const live = liveStatus(r);
  return {
    id: r.run.id,
    status: live.status,
    progress: live.progress,
    message: live.message,
    datasetId: r.run.datasetId,
    datasetName: r.datasetName,
    segments: segmentsOf(r),
    createdBy: r.createdBy,
    createdAt: r.run.createdAt.toISOString(),
    finishedAt: r.run.finishedAt?.toISOString() ?? null,
    comparable: live.status === 'succeeded' && isCurrentResults(r.run.results),
  };
}

function selectRuns() {
  return getDb()
    .select({
      run: fitRuns,
      job: { status: jobs.status, progress: jobs.progress, message: jobs.message, error: jobs.error },
      datasetName: datasets.name,
      createdBy: users.name,
    })
    .from(fitRuns)
    .innerJoin(datasets, eq(datasets.id, fitRuns.datasetId))
    .innerJoin(users, eq(users.id, fitRuns.createdBy))
    .leftJoin(jobs, eq(jobs.id, fitRuns.jobId));
}

/**
 * Requests a fit: checks the role, the dataset (404 when unavailable), the segments and the window
 * (422 naming the problem), then creates the run and queues its job in one transaction.
 */
export async function createFit(actor: SessionUser, input: FitRequestInput | unknown): Promise<{ id: number; status: 'queued' }> {
  assertCan(actor, 'fits:run', 'Only analysts and validators can run fits.');
  const request = parseOrThrow(fitRequestSchema, input, 'invalid:fit-request', 'The fit request is not valid.');
  const db = getDb();
  const dataset = await loadFittableDataset(db, request.datasetId);
  await loadPanels(db, request); // validates segments and window before anything is written
  return db.transaction(async (tx) => {
    const [res] = await tx.insert(fitRuns).values({
      datasetId: dataset.id,
      datasetSha256: dataset.sha256,
      request,
      engineVersion: ENGINE_VERSION,
      seeds: { bootstrap: request.bootstrap?.seed ?? null, audit: request.audit?.seed ?? null },
      createdBy: actor.id,
    });
    const id = Number(res.insertId);
    const jobId = await enqueueJob(tx, {
      kind: FIT_JOB,
      payload: { fitRunId: id, datasetId: dataset.id, datasetSha256: dataset.sha256 },
      createdBy: actor.id,
    });
    await tx.update(fitRuns).set({ jobId }).where(eq(fitRuns.id, id));
    return { id, status: 'queued' as const };
  });
}

export async function getFit(actor: SessionUser, id: number): Promise<FitDto> {
  assertCan(actor, 'fits:read');
  const [r] = await selectRuns().where(eq(fitRuns.id, id)).limit(1);
  if (!r) throw new AppError('not_found:fit', `There is no fit run ${id}.`);
  const live = liveStatus(r as Row);
  return {
    ...toSummary(r as Row),
    request: r.run.request as FitRequest,
    results: (r.run.results as FitResults | null) ?? null,
    error: live.error,
    datasetSha256: r.run.datasetSha256,
    engineVersion: r.run.engineVersion,
    seeds: r.run.seeds as FitDto['seeds'],
    jobId: r.run.jobId,
    mayCancel: r.run.createdBy === actor.id && (live.status === 'queued' || live.status === 'running'),
  };
}

/**
 * One segment of a finished run, as the review draws it, for pages that show a single segment's
 * evidence (an assumption version's page). Null when the run has no current results for it (not
 * finished, an older layout, or the segment failed).
 */
export async function getFitSegment(
  actor: SessionUser,
  fitId: number,
  segment: string,
): Promise<{ fitId: number; bootstrapRequested: boolean; engineVersion: string; segment: FitSegmentResult } | null> {
  const fit = await getFit(actor, fitId);
  if (!fit.results || !isCurrentResults(fit.results)) return null;
  const found = findSegment(fit.results, segment);
  if (!found || !('fit' in found)) return null;
  return { fitId: fit.id, bootstrapRequested: !!fit.request.bootstrap, engineVersion: fit.engineVersion, segment: found.fit };
}

export async function listFits(actor: SessionUser, opts: { limit?: number } = {}): Promise<FitSummaryDto[]> {
  assertCan(actor, 'fits:read');
  const rows = await selectRuns().orderBy(desc(fitRuns.id)).limit(opts.limit ?? 100);
  return rows.map((r) => toSummary(r as Row));
}

/** Finished runs by id, for Compare runs (unknown ids are a 404 naming them). */
export async function getFitsForCompare(actor: SessionUser, ids: number[]): Promise<FitDto[]> {
  assertCan(actor, 'fits:read');
  const out: FitDto[] = [];
  for (const id of ids) out.push(await getFit(actor, id));
  return out;
}

/** Cancels a queued or running fit; only the person who started it may. */
export async function cancelFit(actor: SessionUser, id: number): Promise<FitSummaryDto> {
  assertCan(actor, 'fits:run', 'Only analysts and validators can cancel fits.');
  const [r] = await selectRuns().where(eq(fitRuns.id, id)).limit(1);
  if (!r) throw new AppError('not_found:fit', `There is no fit run ${id}.`);
  if (r.run.createdBy !== actor.id) throw new AppError('forbidden:fits-cancel', 'Only the person who started this fit can cancel it.');
  if (!r.run.jobId || r.run.status === 'succeeded') throw new AppError('conflict:fit-finished', 'This fit has finished; it cannot be cancelled.');
  await cancelJob(getDb(), r.run.jobId);
  const [after] = await selectRuns().where(eq(fitRuns.id, id)).limit(1);
  return toSummary(after as Row);
}

export type FittableDatasetDto = {
  id: number;
  name: string;
  kind: string;
  sha256: string;
  createdAt: string;
  superseded: boolean;
  segments: { name: string; from: number; to: number; periods: number }[];
};

/** Ready datasets with their segments and period ranges, for the New fit form. */
export async function listFittableDatasets(actor: SessionUser): Promise<FittableDatasetDto[]> {
  assertCan(actor, 'fits:read');
  const db = getDb();
  const ds = await db.select().from(datasets).where(eq(datasets.status, 'ready')).orderBy(desc(datasets.id)).limit(200);
  if (ds.length === 0) return [];
  const ranges = await db
    .select({
      datasetId: cohortRows.datasetId,
      name: segments.name,
      from: sql<number>`min(${cohortRows.period})`,
      to: sql<number>`max(${cohortRows.period})`,
      periods: sql<number>`count(*)`,
    })
    .from(cohortRows)
    .innerJoin(segments, eq(segments.id, cohortRows.segmentId))
    .where(inArray(cohortRows.datasetId, ds.map((d) => d.id)))
    .groupBy(cohortRows.datasetId, segments.name)
    .orderBy(asc(segments.name));
  return ds.map((d) => ({
    id: d.id,
    name: d.name,
    kind: d.kind,
    sha256: d.sha256,
    createdAt: d.createdAt.toISOString(),
    superseded: d.supersededById !== null,
    segments: ranges
      .filter((r) => r.datasetId === d.id)
      .map((r) => ({ name: r.name, from: Number(r.from), to: Number(r.to), periods: Number(r.periods) })),
  }));
}

