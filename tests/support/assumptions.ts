import { createHash } from 'node:crypto';
import { getDb } from '@/db/connection';
import { datasets, fitRuns } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';

let counter = 0;

/**
 * Panel A, fitted with SciPy 1.17 (tests/fixtures/engine/make_fixtures.py): binomialMle rho
 * 0.037091, pd 0.013307, profile interval [0.01177, 0.1147] at 95%.
 */
export const PANEL_A_FIT = { rho: 0.037091, pd: 0.013307, profile: { level: 0.95, lower: 0.01177, upper: 0.1147 } };

/**
 * Inserts a dataset and a finished fit run whose results hold one segment (the engine's shape), or
 * the segments given (`opts.segments`, such as fitPanel's results).
 */
export async function makeFitRun(
  userId: number,
  segment: string,
  fit: { rho: number; pd: number; profile: { level: number; lower: number; upper: number } } = PANEL_A_FIT,
  opts: { status?: 'succeeded' | 'running'; dataset?: { id: number; sha256: string }; periods?: string[]; segments?: unknown[]; pairs?: unknown } = {},
): Promise<{ fitId: number; datasetId: number; sha256: string }> {
  counter += 1;
  const tag = `${Date.now().toString(36)}-${counter}`;
  const db = getDb();
  let datasetId: number;
  let sha256: string;
  if (opts.dataset) {
    // A fit of a dataset that was uploaded for real (its cohort rows are stored).
    datasetId = opts.dataset.id;
    sha256 = opts.dataset.sha256;
  } else {
    sha256 = createHash('sha256').update(`assumption-test-${tag}`).digest('hex');
    const [ds] = await db.insert(datasets).values({
      kind: 'cohort',
      name: `Assumption test data ${tag}`,
      sha256,
      dedupeKey: sha256,
      status: 'ready',
      sizeBytes: 100,
      fileName: `cohorts-${tag}.csv`,
      uploadedBy: userId,
      segmentCount: 1,
      rowCount: 10,
    });
    datasetId = Number(ds.insertId);
  }
  const periods = opts.periods ?? Array.from({ length: 10 }, (_, i) => String(2010 + i));
  const results = {
    engine: { version: 'test-engine-1' },
    // a factor-correlation matrix block (lib/stats/factor-correlation-matrix.ts) when given
    ...(opts.pairs ? { pairs: opts.pairs } : {}),
    // the engine's own results when given (fitPanel's SegmentFit), else the hand-made segment below
    segments: opts.segments ?? [
      {
        segment,
        T: periods.length,
        periods,
        estimates: {
          binomialMle: { rho: fit.rho, pd: fit.pd, status: 'ok', atBoundary: false, logLik: -33.785195, intervals: { profile: fit.profile, wald: null, bootstrap: null } },
          vasicekMle: { rho: null, pd: null, status: 'undefined', reason: 'a period has no defaults' },
          momentVariance: { rho: 0.05111, pd: 0.0134, status: 'ok' },
          momentVarianceCorrected: { rho: 0.04, pd: 0.0134, status: 'ok' },
          jointDefault: { rho: 0.037745, pd: 0.0134, status: 'ok' },
        },
        warnings: [],
        timing: { ms: 1 },
      },
    ],
  };
  const [run] = await db.insert(fitRuns).values({
    datasetId,
    datasetSha256: sha256,
    request: { segments: [segment], level: 0.95 },
    engineVersion: 'test-engine-1',
    seeds: { bootstrap: 7, audit: 11 },
    createdBy: userId,
    status: opts.status ?? 'succeeded',
    results: opts.status === 'running' ? null : results,
    finishedAt: opts.status === 'running' ? null : new Date(),
  });
  return { fitId: Number(run.insertId), datasetId, sha256 };
}

/** A complete draft body for POST /api/assumptions. */
export function draftBody(fitId: number, segment: string, over: Record<string, unknown> = {}) {
  return {
    fitId,
    segment,
    estimator: 'binomialMle',
    intervalMethod: 'profile',
    margins: {
      data: { value: 0.01, rationale: 'Ten annual observations only.' },
      practice: { value: 0, rationale: 'No change in lending practice over the window.' },
      general: { value: 0.02, rationale: 'The estimate is biased low at T = 10.' },
    },
    intendedUses: 'Economic capital and stress testing of the segment.',
    limitations: 'Valid only with the PD of the fit and the 90-days-past-due definition of default.',
    effectiveDate: new Date().toISOString().slice(0, 10),
    ...over,
  };
}

/** A JSON answer: tests check its fields one by one. */
export type ApiAnswer = { status: number; body: Record<string, unknown>; text: string; headers: Headers };


/** Calls a route handler as Next would, with JSON in and the status and JSON (or text) out. */
export async function call<P extends Record<string, string>>(
  handler: (req: Request, ctx: { params: Promise<P> }) => Promise<Response> | Response,
  opts: { method?: string; url?: string; body?: unknown; params?: P; headers?: Record<string, string> } = {},
): Promise<ApiAnswer> {
  const req = new Request(opts.url ?? 'http://127.0.0.1/api/test', {
    method: opts.method ?? (opts.body === undefined ? 'GET' : 'POST'),
    headers: { 'content-type': 'application/json', ...(opts.headers ?? {}) },
    body: opts.body === undefined ? undefined : JSON.stringify(opts.body),
  });
  const res = await handler(req, { params: Promise.resolve(opts.params ?? ({} as P)) });
  const text = await res.text();
  let body: Record<string, unknown> = {};
  try {
    body = text ? (JSON.parse(text) as Record<string, unknown>) : {};
  } catch {
    body = {};
  }
  return { status: res.status, body, text, headers: res.headers };
}

export type { SessionUser };
