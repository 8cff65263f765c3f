import { todayIso } from '@/lib/assumptions/dates';
import { publishedMatrices } from '@/lib/dal/factor-matrices';
import { authenticateToken } from '@/lib/dal/tokens';
import { errorResponse } from '@/lib/errors';
import { matricesCsv } from '@/lib/factor-matrices/consumer';

/**
 * GET: the published factor-correlation matrices as one long CSV (a row per pair), for a token with
 * the export scope; the cautions as `# ` lines above the header (`?comments=0` leaves them out).
 */
export async function GET(req: Request) {
  try {
    const principal = await authenticateToken(req.headers.get('authorization'), 'assumptions:export');
    const matrices = await publishedMatrices(principal, 'assumptions:export');
    return new Response(matricesCsv(matrices, new URL(req.url).searchParams.get('comments') !== '0'), {
      headers: {
        'content-type': 'text/csv; charset=utf-8',
        'content-disposition': `attachment; filename="rhobook-factor-matrices-${todayIso()}.csv"`,
      },
    });
  } catch (err) {
    return errorResponse(err);
  }
}
