import { z } from 'zod';
import { cautionsFor, toConsumerVersion } from '@/lib/assumptions/consumer';
import { publishedVersion } from '@/lib/dal/assumptions';
import { authenticateToken } from '@/lib/dal/tokens';
import { AppError, errorResponse } from '@/lib/errors';

const paramsSchema = z.object({ id: z.coerce.number().int().positive(), version: z.coerce.number().int().positive() });

/** GET: an exact published version (superseded, expired and retired ones too), with lineage and cautions. */
export async function GET(req: Request, ctx: { params: Promise<{ id: string; version: string }> }) {
  try {
    const principal = await authenticateToken(req.headers.get('authorization'), 'assumptions:read');
    const p = paramsSchema.safeParse(await ctx.params);
    if (!p.success) throw new AppError('not_found:assumption', 'There is no such assumption version.');
    const c = toConsumerVersion(await publishedVersion(principal, p.data.id, p.data.version));
    return Response.json({ assumption: c, cautions: cautionsFor(c) });
  } catch (err) {
    return errorResponse(err);
  }
}
