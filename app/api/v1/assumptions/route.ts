import { z } from 'zod';
import { cautions, cautionsFor, toConsumerVersion } from '@/lib/assumptions/consumer';
import { isIsoDate, todayIso } from '@/lib/assumptions/dates';
import { cachedAnswer } from '@/lib/dal/answer-cache';
import { listInForce, versionInForce } from '@/lib/dal/assumptions';
import { authenticateToken } from '@/lib/dal/tokens';
import { AppError, errorResponse } from '@/lib/errors';

const utf8 = new TextEncoder();

const querySchema = z.object({
  segment: z.string().trim().min(1).max(120).optional(),
  asOf: z.string().refine(isIsoDate, 'asOf must be a calendar date written YYYY-MM-DD.').optional(),
});

/**
 * GET ?segment=&asOf=: the version in force at the end of that date (default today: now), by the
 * supersession chain and publication time (lib/assumptions/in-force.ts), with lineage and cautions.
 * The token is checked on every call; the answer is kept while nothing it reads has changed.
 */
export async function GET(req: Request) {
  try {
    const principal = await authenticateToken(req.headers.get('authorization'), 'assumptions:read');
    const url = new URL(req.url);
    const q = querySchema.safeParse({ segment: url.searchParams.get('segment') ?? undefined, asOf: url.searchParams.get('asOf') ?? undefined });
    if (!q.success) throw new AppError('bad_request:query', q.error.issues[0]?.message ?? 'The query is not valid.');
    const asOf = q.data.asOf ?? todayIso();
    // Kept while nothing it is built from changes (lib/dal/answer-cache.ts), as the UTF-8 bytes of the JSON.
    const segment = q.data.segment;
    const body = segment
      ? await cachedAnswer(`segment\u0000${segment}\u0000${asOf}`, asOf, async (now) => {
          const c = toConsumerVersion(await versionInForce(principal, segment, asOf, now));
          return utf8.encode(JSON.stringify({ asOf, assumption: c, cautions: cautionsFor(c) }));
        }, principal.stamp)
      : await cachedAnswer(`all\u0000${asOf}`, asOf, async (now) => {
          const { versions, missing } = await listInForce(principal, asOf, now);
          return utf8.encode(JSON.stringify({ asOf, assumptions: versions.map(toConsumerVersion), missing, cautions }));
        }, principal.stamp);
    return new Response(body, { headers: { 'content-type': 'application/json' } });
  } catch (err) {
    return errorResponse(err);
  }
}
