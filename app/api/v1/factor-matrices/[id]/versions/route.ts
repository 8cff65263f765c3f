import { z } from 'zod';
import { matrixVersions } from '@/lib/dal/factor-matrices';
import { authenticateToken } from '@/lib/dal/tokens';
import { AppError, errorResponse } from '@/lib/errors';
import { matrixCautions } from '@/lib/factor-matrices/cautions';

const paramsSchema = z.object({ id: z.coerce.number().int().positive() });

/** GET: every published version of a matrix (superseded, expired and retired ones too), newest first. */
export async function GET(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const principal = await authenticateToken(req.headers.get('authorization'), 'assumptions:read');
    const p = paramsSchema.safeParse(await ctx.params);
    if (!p.success) throw new AppError('not_found:factor-matrix', 'There is no such factor-correlation matrix.');
    return Response.json({ matrixId: p.data.id, versions: await matrixVersions(principal, p.data.id), cautions: matrixCautions });
  } catch (err) {
    return errorResponse(err);
  }
}
