import { exportColumns, exportRow, toConsumerVersion } from '@/lib/assumptions/consumer';
import { todayIso } from '@/lib/assumptions/dates';
import { requireUser } from '@/lib/auth/session';
import { toCsv } from '@/lib/csv';
import { listPublished } from '@/lib/dal/assumptions';
import { errorResponse } from '@/lib/errors';

/** GET: the published library as CSV for a signed-in user (the same columns as /api/v1/assumptions/export). */
export async function GET() {
  try {
    const actor = await requireUser();
    const rows = (await listPublished(actor)).map((v) => exportRow(toConsumerVersion(v)));
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
