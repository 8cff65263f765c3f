import { libraryCsv, toConsumerVersion } from '@/lib/assumptions/consumer';
import { todayIso } from '@/lib/assumptions/dates';
import { listPublished } from '@/lib/dal/assumptions';
import { authenticateToken } from '@/lib/dal/tokens';
import { errorResponse } from '@/lib/errors';

/**
 * GET: the published library as CSV (one row per segment), for a token with the export scope: the
 * cautions as `# ` lines above the header (`?comments=0` leaves them out).
 */
export async function GET(req: Request) {
  try {
    const principal = await authenticateToken(req.headers.get('authorization'), 'assumptions:export');
    const versions = (await listPublished(principal, 'assumptions:export')).map(toConsumerVersion);
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
