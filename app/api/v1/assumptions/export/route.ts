import { exportColumns, exportRow, toConsumerVersion } from '@/lib/assumptions/consumer';
import { todayIso } from '@/lib/assumptions/dates';
import { toCsv } from '@/lib/csv';
import { listPublished } from '@/lib/dal/assumptions';
import { authenticateToken } from '@/lib/dal/tokens';
import { errorResponse } from '@/lib/errors';

/** GET: the published library as CSV (one row per segment), for a token with the export scope. */
export async function GET(req: Request) {
  try {
    const principal = await authenticateToken(req.headers.get('authorization'), 'assumptions:export');
    const rows = (await listPublished(principal, 'assumptions:export')).map((v) => exportRow(toConsumerVersion(v)));
    return new Response(toCsv(exportColumns, rows, { bom: true }), {
      headers: {
        'content-type': 'text/csv; charset=utf-8',
        'content-disposition': `attachment; filename="rhobook-library-${todayIso()}.csv"`,
      },
    });
  } catch (err) {
    return errorResponse(err);
  }
}
