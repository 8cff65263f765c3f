import 'server-only';
import { and, asc, eq, gte, inArray, lte } from 'drizzle-orm';
import type { DbOrTx } from '@/db/connection';
import { cohortRows, datasets, segments, type Dataset } from '@/db/schema';
import { AppError } from '@/lib/errors';
import { MIN_PERIODS, type FitRequest } from '@/lib/fits/request';
import type { SegmentInput } from '@/lib/fits/run';

/**
 * The panels a fit reads: each requested segment's annual cohort rows inside the window. Used when
 * a fit is requested (lib/dal/fits.ts, to refuse a bad window before anything is written) and by
 * the fit job (lib/dal/fit-runs.ts). Nothing here checks who the caller is: callers do.
 */


/**
 * A dataset may be fitted when it exists and is ready (not still converting, not failed). Anything
 * else is "unavailable" and answered as not found: datasets are visible to every signed-in role of
 * the organisation, so the only datasets a user "may not see" are missing, deleted or unusable ones.
 */
export async function loadFittableDataset(db: DbOrTx, datasetId: number): Promise<Dataset> {
  const [ds] = await db.select().from(datasets).where(eq(datasets.id, datasetId)).limit(1);
  if (!ds) throw new AppError('not_found:dataset', `There is no dataset ${datasetId}.`);
  if (ds.status !== 'ready') {
    throw new AppError('not_found:dataset', `Dataset ${datasetId} is ${ds.status === 'processing' ? 'still being converted' : 'not usable (its conversion failed)'}; it cannot be fitted.`);
  }
  return ds;
}

/**
 * Reads the panels of the requested segments inside the window, one per segment, in period order.
 * Throws `invalid:fit-segments` naming an unknown segment, and `invalid:fit-window` naming a segment
 * with fewer than MIN_PERIODS periods in the window.
 */
export async function loadPanels(db: DbOrTx, request: FitRequest): Promise<SegmentInput[]> {
  const conditions = [eq(cohortRows.datasetId, request.datasetId)];
  if (request.from !== undefined) conditions.push(gte(cohortRows.period, request.from));
  if (request.to !== undefined) conditions.push(lte(cohortRows.period, request.to));
  if (request.segments) {
    const known = await db
      .selectDistinct({ name: segments.name })
      .from(cohortRows)
      .innerJoin(segments, eq(segments.id, cohortRows.segmentId))
      .where(and(eq(cohortRows.datasetId, request.datasetId), inArray(segments.name, request.segments)));
    const names = new Set(known.map((k) => k.name));
    const unknown = request.segments.filter((s) => !names.has(s));
    if (unknown.length > 0) {
      throw new AppError('invalid:fit-segments', `Dataset ${request.datasetId} has no segment named ${unknown.map((u) => `"${u}"`).join(', ')}.`, { field: 'segments' });
    }
    conditions.push(inArray(segments.name, request.segments));
  }
  const rows = await db
    .select({
      segment: segments.name,
      assetClass: segments.assetClass,
      turnover: segments.turnoverEurMillions,
      period: cohortRows.period,
      obligors: cohortRows.obligors,
      defaults: cohortRows.defaults,
    })
    .from(cohortRows)
    .innerJoin(segments, eq(segments.id, cohortRows.segmentId))
    .where(and(...conditions))
    .orderBy(asc(segments.name), asc(cohortRows.period));
  const bySegment = new Map<string, SegmentInput>();
  for (const r of rows) {
    let s = bySegment.get(r.segment);
    if (!s) {
      s = { segment: r.segment, assetClass: r.assetClass, turnoverEurMillions: r.turnover, periods: [], obligors: [], defaults: [] };
      bySegment.set(r.segment, s);
    }
    s.periods.push(String(r.period));
    s.obligors.push(r.obligors);
    s.defaults.push(r.defaults);
  }
  const wanted = request.segments ?? [...bySegment.keys()];
  const window = `${request.from ?? 'the first period'} to ${request.to ?? 'the last period'}`;
  if (wanted.length === 0) throw new AppError('invalid:fit-window', `Dataset ${request.datasetId} has no cohort rows from ${window}.`, { field: 'from' });
  return wanted.map((name) => {
    const s = bySegment.get(name);
    const n = s?.periods.length ?? 0;
    if (!s || n < MIN_PERIODS) {
      throw new AppError('invalid:fit-window', `Segment "${name}" has ${n} period${n === 1 ? '' : 's'} from ${window}; a fit needs at least ${MIN_PERIODS}.`, { field: 'from' });
    }
    return s;
  });
}
