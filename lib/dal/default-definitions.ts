import 'server-only';
import { and, asc, eq, gte, inArray, lte } from 'drizzle-orm';
import type { DbOrTx } from '@/db/connection';
import { cohortRows, segments } from '@/db/schema';
import { definitionSpans, type DefinitionSpan } from '@/lib/ingest/default-definition';

/**
 * The definitions of default of a dataset's segments over a window of years, read from the stored
 * cohort rows (datasets never change, so a fit's or an assumption's definitions can be read again
 * at any time and are frozen into an assumption when drafted). Checks no role: callers do.
 */
export async function definitionsOf(
  db: DbOrTx,
  datasetId: number,
  segmentNames: readonly string[],
  window: { from?: number | string | null; to?: number | string | null } = {},
): Promise<Map<string, DefinitionSpan[]>> {
  const out = new Map<string, DefinitionSpan[]>();
  if (!segmentNames.length) return out;
  const conds = [eq(cohortRows.datasetId, datasetId), inArray(segments.name, [...segmentNames])];
  if (window.from !== undefined && window.from !== null && window.from !== '') conds.push(gte(cohortRows.period, Number(window.from)));
  if (window.to !== undefined && window.to !== null && window.to !== '') conds.push(lte(cohortRows.period, Number(window.to)));
  const rows = await db
    .select({ segment: segments.name, period: cohortRows.period, definition: cohortRows.defaultDefinition })
    .from(cohortRows)
    .innerJoin(segments, eq(segments.id, cohortRows.segmentId))
    .where(and(...conds))
    .orderBy(asc(segments.name), asc(cohortRows.period));
  const bySegment = new Map<string, { period: number; definition: string | null }[]>();
  for (const r of rows) bySegment.set(r.segment, [...(bySegment.get(r.segment) ?? []), r]);
  for (const name of segmentNames) out.set(name, definitionSpans(bySegment.get(name) ?? []));
  return out;
}
