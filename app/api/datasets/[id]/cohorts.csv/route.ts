import { z } from 'zod';
import { requireUser } from '@/lib/auth/session';
import { getDatasetCohortsForExport } from '@/lib/dal/datasets';
import { datasetIdFrom } from '@/lib/http/route-params';
import { errorResponse, parseOrThrow } from '@/lib/errors';
import { cohortRowsToCsv } from '@/lib/ingest/export';

/**
 * The dataset's cohort rows as `segment,period,obligors,defaults`, preceded by "# " comment lines
 * with the conventions and the censored list (`?comments=0` leaves them out); `?segment=NAME`
 * gives one segment's rows. Text cells are neutralised against spreadsheet formulas.
 */
const querySchema = z.object({ segment: z.string().min(1).max(200).optional(), comments: z.string().max(5).optional() });

export async function GET(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const q = parseOrThrow(querySchema, Object.fromEntries(new URL(req.url).searchParams), 'invalid:query', 'The query is not valid.');
    const { fileBase, comments, rows } = await getDatasetCohortsForExport(actor, await datasetIdFrom(ctx), q.segment);
    const withComments = q.comments !== '0';
    return new Response(cohortRowsToCsv(rows, withComments ? comments : []), {
      headers: {
        'Content-Type': 'text/csv; charset=utf-8',
        'Content-Disposition': `attachment; filename="${fileBase}.csv"`,
      },
    });
  } catch (err) {
    return errorResponse(err);
  }
}
