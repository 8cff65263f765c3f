import { z } from 'zod';
import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { editMatrixDraft } from '@/lib/dal/factor-matrices';
import { AppError, errorResponse, parseOrThrow } from '@/lib/errors';
import { matrixEditSchema } from '@/lib/factor-matrices/content';

const paramsSchema = z.object({ id: z.coerce.number().int().positive() });

/** PATCH: an analyst edits a matrix version's judgement (margin, rationale, uses, limitations, dates); after submission it returns to draft. */
export async function PATCH(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const p = paramsSchema.safeParse(await ctx.params);
    if (!p.success) throw new AppError('not_found:factor-matrix', 'There is no such factor-correlation matrix version.');
    const body = parseOrThrow(matrixEditSchema, await readJsonBody(req), 'invalid:assumption', 'The matrix draft is not valid.');
    const v = await editMatrixDraft(actor, p.data.id, body);
    return Response.json({ id: v.id, status: v.status, contentHash: v.contentHash });
  } catch (err) {
    return errorResponse(err);
  }
}
