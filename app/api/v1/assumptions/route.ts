import { z } from 'zod';
import { cautions, cautionsFor, toConsumerVersion } from '@/lib/assumptions/consumer';
import { isIsoDate, todayIso } from '@/lib/assumptions/dates';
import { listInForce, versionInForce } from '@/lib/dal/assumptions';
import { authenticateToken } from '@/lib/dal/tokens';
import { AppError, errorResponse } from '@/lib/errors';

const querySchema = z.object({
  segment: z.string().trim().min(1).max(120).optional(),
  asOf: z.string().refine(isIsoDate, 'asOf must be a calendar date written YYYY-MM-DD.').optional(),
});

/**
 * GET ?segment=&asOf=: the version in force at the end of that date (default today: now), by the
 * supersession chain and publication time (lib/assumptions/in-force.ts), with lineage and cautions.
 */
export async function GET(req: Request) {
  try {
    const principal = await authenticateToken(req.headers.get('authorization'), 'assumptions:read');
    const url = new URL(req.url);
    const q = querySchema.safeParse({ segment: url.searchParams.get('segment') ?? undefined, asOf: url.searchParams.get('asOf') ?? undefined });
    if (!q.success) throw new AppError('bad_request:query', q.error.issues[0]?.message ?? 'The query is not valid.');
    const now = new Date();
    const asOf = q.data.asOf ?? todayIso(now);
    if (q.data.segment) {
      const c = toConsumerVersion(await versionInForce(principal, q.data.segment, asOf, now));
      return Response.json({ asOf, assumption: c, cautions: cautionsFor(c) });
    }
    const { versions, missing } = await listInForce(principal, asOf, now);
    return Response.json({ asOf, assumptions: versions.map(toConsumerVersion), missing, cautions });
  } catch (err) {
    return errorResponse(err);
  }
}
