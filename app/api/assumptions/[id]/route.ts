import { z } from 'zod';
import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { editDraft, getVersionPage } from '@/lib/dal/assumptions';
import { AppError, errorResponse, parseOrThrow } from '@/lib/errors';
import { editInputSchema } from '@/lib/assumptions/content';

const paramsSchema = z.object({ id: z.coerce.number().int().positive() });
type Ctx = { params: Promise<{ id: string }> };

async function versionId(ctx: Ctx): Promise<number> {
  const p = paramsSchema.safeParse(await ctx.params);
  if (!p.success) throw new AppError('not_found:assumption', 'There is no such assumption version.');
  return p.data.id;
}

/** GET: one version with its history, reviews, audit trail and the actions open to me. */
export async function GET(_req: Request, ctx: Ctx) {
  try {
    const actor = await requireUser();
    return Response.json(await getVersionPage(actor, await versionId(ctx)));
  } catch (err) {
    return errorResponse(err);
  }
}

/** PATCH: edit the judgement (an edit after submission returns the version to draft and voids reviews). */
export async function PATCH(req: Request, ctx: Ctx) {
  try {
    const actor = await requireUser();
    const id = await versionId(ctx);
    const body = parseOrThrow(editInputSchema, await readJsonBody(req), 'invalid:assumption', 'The change is not valid.');
    const v = await editDraft(actor, id, body);
    return Response.json({ id: v.id, status: v.status, contentHash: v.contentHash });
  } catch (err) {
    return errorResponse(err);
  }
}
