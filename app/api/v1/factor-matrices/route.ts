import { z } from 'zod';
import { isIsoDate, todayIso } from '@/lib/assumptions/dates';
import { matricesInForce } from '@/lib/dal/factor-matrices';
import { authenticateToken } from '@/lib/dal/tokens';
import { AppError, errorResponse } from '@/lib/errors';
import { matrixCautions } from '@/lib/factor-matrices/cautions';

const querySchema = z.object({
  asOf: z.string().refine(isIsoDate, 'asOf must be a calendar date written YYYY-MM-DD.').optional(),
  segments: z
    .string()
    .transform((s) => s.split(',').map((x) => x.trim()).filter(Boolean))
    .refine((a) => a.length >= 2, 'segments names at least two segments, separated by commas (segments=A,B,C).')
    .optional(),
});

/**
 * GET ?asOf=&segments=A,B,C: each factor-correlation matrix in force at the end of that date
 * (default now), by the supersession chain (lib/assumptions/in-force.ts); with `segments`, only the
 * matrix of exactly that set.
 */
export async function GET(req: Request) {
  try {
    const principal = await authenticateToken(req.headers.get('authorization'), 'assumptions:read');
    const url = new URL(req.url);
    const q = querySchema.safeParse({ asOf: url.searchParams.get('asOf') ?? undefined, segments: url.searchParams.get('segments') ?? undefined });
    if (!q.success) throw new AppError('bad_request:query', q.error.issues[0]?.message ?? 'The query is not valid.');
    const now = new Date();
    const asOf = q.data.asOf ?? todayIso(now);
    const { matrices, missing } = await matricesInForce(principal, asOf, q.data.segments ?? null, now);
    return Response.json({ asOf, matrices, missing, cautions: matrixCautions });
  } catch (err) {
    return errorResponse(err);
  }
}
