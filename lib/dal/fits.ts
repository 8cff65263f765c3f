import 'server-only';
import { asc, desc, eq, inArray, sql } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { cohortRows, datasets, fitRunSegments, fitRuns, jobs, segments, users, type FitRunStatus } from '@/db/schema';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { AppError, parseOrThrow } from '@/lib/errors';
import { loadFittableDataset, loadPanels } from './panels';
import { definitionsOf } from './default-definitions';
import type { DefinitionSpan } from '@/lib/ingest/default-definition';
import { fitRequestSchema, needsWholeRun, type FitRequest, type FitRequestInput } from '@/lib/fits/request';
import { findSegment, isCurrentResults, type FitResults, type FitSegmentResult } from '@/lib/fits/results';
import { FIT_JOB } from '@/lib/jobs/kinds/fit-payload';
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
  /** breakTest is absent in runs stored before the break test's bootstrap; mixingLaws in runs that did not challenge the Gaussian copula. */
  seeds: { bootstrap: number | null; audit: number | null; breakTest?: number | null; mixingLaws?: number };
  /** The run's jobs: one per segment, in the order of its segments (one for a run from before runs were split). */
  jobIds: number[];
  mayCancel: boolean;
  /** Each segment's definitions of default over the fitted years (from the dataset's rows). */
  defaultDefinitions: { segment: string; spans: DefinitionSpan[] }[];
};

type JobState = { id: number; status: FitRunStatus; progress: number; message: string | null; error: string | null };

type Row = {
  run: typeof fitRuns.$inferSelect;
  /** The run's jobs: one per segment (a run from before runs were split: its one job). */
  jobs: JobState[];
  datasetName: string;
  createdBy: string;
};

/**
 * A run's state from its jobs while it is not finished: progress is the mean of its segments' jobs
 * (a finished segment counts 100), the message is that of a segment being computed, and the run is
 * failed or cancelled as soon as one of its jobs ended so.
 */
function liveStatus(r: Row): { status: FitRunStatus; progress: number; message: string | null; error: string | null } {
  if (r.run.status === 'succeeded') return { status: 'succeeded', progress: 100, message: 'Finished', error: null };
  if (r.jobs.length === 0 || r.run.status === 'failed' || r.run.status === 'cancelled') {
    const failedJob = r.jobs.find((j) => j.status === 'failed');
    return { status: r.run.status, progress: 0, message: null, error: r.run.error ?? failedJob?.error ?? null };
  }
  const failed = r.jobs.find((j) => j.status === 'failed');
  if (failed) return { status: 'failed', progress: 0, message: failed.message, error: failed.error };
  if (r.jobs.some((j) => j.status === 'cancelled')) return { status: 'cancelled', progress: 0, message: 'Cancelled', error: null };
  const progress = Math.floor(r.jobs.reduce((sum, j) => sum + (j.status === 'succeeded' ? 100 : j.progress), 0) / r.jobs.length);
  const done = r.jobs.filter((j) => j.status === 'succeeded').length;
  const running = r.jobs.filter((j) => j.status === 'running');
  // Every job succeeded but the run holds no results: its assembly was lost (should not happen), say so.
  if (done === r.jobs.length) return { status: 'failed', progress: 0, message: null, error: 'The segments were computed but the results were not assembled; start the fit again.' };
  if (running.length === 0) return { status: done > 0 ? 'running' : 'queued', progress, message: done > 0 ? `${done} of ${r.jobs.length} segments done; waiting for a worker` : 'Waiting for a worker', error: null };
  const prefix = r.jobs.length > 1 ? `${done} of ${r.jobs.length} segments done; ` : '';
  return { status: 'running', progress: Math.min(99, progress), message: `${prefix}${running[0].message ?? 'Started'}`, error: null };
}

/** The jobs of the given runs, by run: the segments' jobs, or the one job of a run from before runs were split. */
async function jobsOfRuns(runs: { id: number; jobId: number | null; status: FitRunStatus }[], all: boolean): Promise<Map<number, JobState[]>> {
  const out = new Map<number, JobState[]>();
  // A finished run's jobs matter only to its own page (a list shows its stored status).
  const open = all ? runs : runs.filter((r) => r.status !== 'succeeded');
  if (open.length === 0) return out;
  const db = getDb();
  const pick = { id: jobs.id, status: jobs.status, progress: jobs.progress, message: jobs.message, error: jobs.error };
  const split = await db
    .select({ fitRunId: fitRunSegments.fitRunId, job: pick })
    .from(fitRunSegments)
    .innerJoin(jobs, eq(jobs.id, fitRunSegments.jobId))
    .where(inArray(fitRunSegments.fitRunId, open.map((r) => r.id)))
    .orderBy(asc(fitRunSegments.position));
  for (const { fitRunId, job } of split) out.set(fitRunId, [...(out.get(fitRunId) ?? []), job]);
  const legacy = open.filter((r) => !out.has(r.id) && r.jobId !== null);
  if (legacy.length) {
    const rows = await db.select(pick).from(jobs).where(inArray(jobs.id, legacy.map((r) => r.jobId!)));
    for (const r of legacy) {
      const j = rows.find((x) => x.id === r.jobId);
      if (j) out.set(r.id, [j]);
    }
  }
  return out;
}

async function withJobs(rows: Omit<Row, 'jobs'>[], all = false): Promise<Row[]> {
  const byRun = await jobsOfRuns(rows.map((r) => r.run), all);
  return rows.map((r) => ({ ...r, jobs: byRun.get(r.run.id) ?? [] }));
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
    .select({ run: fitRuns, datasetName: datasets.name, createdBy: users.name })
    .from(fitRuns)
    .innerJoin(datasets, eq(datasets.id, fitRuns.datasetId))
    .innerJoin(users, eq(users.id, fitRuns.createdBy));
}

/**
 * Requests a fit: checks the role, the dataset (404 when unavailable), the segments and the window
 * (422 naming the problem), then creates the run and queues one job per segment in one transaction.
 */
export async function createFit(actor: SessionUser, input: FitRequestInput | unknown): Promise<{ id: number; status: 'queued' }> {
  assertCan(actor, 'fits:run', 'Only analysts and validators can run fits.');
  const request = parseOrThrow(fitRequestSchema, input, 'invalid:fit-request', 'The fit request is not valid.');
  const db = getDb();
  const dataset = await loadFittableDataset(db, request.datasetId);
  const panels = await loadPanels(db, request); // validates segments and window before anything is written
  return db.transaction(async (tx) => {
    const [res] = await tx.insert(fitRuns).values({
      datasetId: dataset.id,
      datasetSha256: dataset.sha256,
      request,
      engineVersion: ENGINE_VERSION,
      seeds: {
        bootstrap: request.bootstrap?.seed ?? null,
        audit: request.audit?.seed ?? null,
        breakTest: request.breakTest?.seed ?? null,
        ...(request.mixingLaws ? { mixingLaws: request.mixingLaws.seed } : {}),
      },
      createdBy: actor.id,
    });
    const id = Number(res.insertId);
    if (needsWholeRun(request)) {
      // Grades, pairs, posteriors and the most prudent PD need every segment together: one job.
      const jobId = await enqueueJob(tx, { kind: FIT_JOB, payload: { fitRunId: id, datasetId: dataset.id, datasetSha256: dataset.sha256 }, createdBy: actor.id });
      await tx.update(fitRuns).set({ jobId }).where(eq(fitRuns.id, id));
      return { id, status: 'queued' as const };
    }
    // One job per segment: any number of workers share the run through the queue.
    for (let position = 0; position < panels.length; position++) {
      const name = panels[position].segment;
      const jobId = await enqueueJob(tx, {
        kind: FIT_JOB,
        payload: { fitRunId: id, datasetId: dataset.id, datasetSha256: dataset.sha256, segment: { position, name } },
        createdBy: actor.id,
      });
      await tx.insert(fitRunSegments).values({ fitRunId: id, position, segment: name, jobId });
    }
    return { id, status: 'queued' as const };
  });
}

export async function getFit(actor: SessionUser, id: number): Promise<FitDto> {
  assertCan(actor, 'fits:read');
  const [found] = await selectRuns().where(eq(fitRuns.id, id)).limit(1);
  if (!found) throw new AppError('not_found:fit', `There is no fit run ${id}.`);
  const [r] = await withJobs([found], true);
  const live = liveStatus(r);
  const summary = toSummary(r);
  const request = r.run.request as FitRequest;
  const definitions = await definitionsOf(getDb(), r.run.datasetId, summary.segments, { from: request.from, to: request.to });
  return {
    ...summary,
    request: r.run.request as FitRequest,
    results: (r.run.results as FitResults | null) ?? null,
    error: live.error,
    datasetSha256: r.run.datasetSha256,
    engineVersion: r.run.engineVersion,
    seeds: r.run.seeds as FitDto['seeds'],
    jobIds: r.jobs.map((j) => j.id),
    mayCancel: r.run.createdBy === actor.id && (live.status === 'queued' || live.status === 'running'),
    defaultDefinitions: summary.segments.map((segment) => ({ segment, spans: definitions.get(segment) ?? [] })),
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
  return (await withJobs(rows)).map(toSummary);
}

/** Finished runs by id, for Compare runs (unknown ids are a 404 naming them). */
export async function getFitsForCompare(actor: SessionUser, ids: number[]): Promise<FitDto[]> {
  assertCan(actor, 'fits:read');
  const out: FitDto[] = [];
  for (const id of ids) out.push(await getFit(actor, id));
  return out;
}

/** Cancels a queued or running fit (every segment's job that has not finished); only the person who started it may. */
export async function cancelFit(actor: SessionUser, id: number): Promise<FitSummaryDto> {
  assertCan(actor, 'fits:run', 'Only analysts and validators can cancel fits.');
  const [found] = await selectRuns().where(eq(fitRuns.id, id)).limit(1);
  if (!found) throw new AppError('not_found:fit', `There is no fit run ${id}.`);
  if (found.run.createdBy !== actor.id) throw new AppError('forbidden:fits-cancel', 'Only the person who started this fit can cancel it.');
  const [r] = await withJobs([found]);
  const open = r.jobs.filter((j) => j.status === 'queued' || j.status === 'running');
  if (r.run.status === 'succeeded' || open.length === 0) throw new AppError('conflict:fit-finished', 'This fit has finished; it cannot be cancelled.');
  for (const j of open) {
    try {
      await cancelJob(getDb(), j.id);
    } catch (err) {
      // A segment that finished meanwhile is left as it is; the others are cancelled.
      if (!(err instanceof AppError && err.code === 'conflict:job-finished')) throw err;
    }
  }
  const [after] = await withJobs((await selectRuns().where(eq(fitRuns.id, id)).limit(1)));
  return toSummary(after);
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

