import { requireUser } from '@/lib/auth/session';
import { getDatasetCohortsForExport } from '@/lib/dal/datasets';
import { datasetIdFrom } from '@/lib/http/route-params';
import { errorResponse } from '@/lib/errors';
import { cohortRowsToCsv } from '@/lib/ingest/export';

/**
 * The dataset's cohort rows as `segment,period,obligors,defaults`, preceded by "# " comment lines
 * with the conventions and the censored list (`?comments=0` leaves them out). Text cells are
 * neutralised against spreadsheet formulas.
 */
export async function GET(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const { fileBase, comments, rows } = await getDatasetCohortsForExport(actor, await datasetIdFrom(ctx));
    const withComments = new URL(req.url).searchParams.get('comments') !== '0';
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
