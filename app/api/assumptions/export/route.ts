import { libraryCsv, toConsumerVersion } from '@/lib/assumptions/consumer';
import { todayIso } from '@/lib/assumptions/dates';
import { requireUser } from '@/lib/auth/session';
import { listPublished } from '@/lib/dal/assumptions';
import { errorResponse } from '@/lib/errors';

/**
 * GET: the published library as CSV for a signed-in user (the same file as /api/v1/assumptions/export):
 * the cautions as `# ` lines above the header (`?comments=0` leaves them out).
 */
export async function GET(req: Request) {
  try {
    const actor = await requireUser();
    const versions = (await listPublished(actor)).map(toConsumerVersion);
    return new Response(libraryCsv(versions, new URL(req.url).searchParams.get('comments') !== '0'), {
      headers: {
        'content-type': 'text/csv; charset=utf-8',
        'content-disposition': `attachment; filename="rhobook-library-${todayIso()}.csv"`,
      },
    });
  } catch (err) {
    return errorResponse(err);
  }
}
