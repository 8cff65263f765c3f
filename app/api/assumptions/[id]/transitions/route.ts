import { z } from 'zod';
import { transitionBodySchema } from '@/lib/assumptions/lifecycle';
import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { transition } from '@/lib/dal/assumptions';
import { AppError, errorResponse, parseOrThrow } from '@/lib/errors';

const paramsSchema = z.object({ id: z.coerce.number().int().positive() });

/** POST { action, comment? }: answers the new state; 409 when the state does not allow it, 403 for a role or person not allowed. */
export async function POST(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const p = paramsSchema.safeParse(await ctx.params);
    if (!p.success) throw new AppError('not_found:assumption', 'There is no such assumption version.');
    const body = parseOrThrow(transitionBodySchema, await readJsonBody(req), 'invalid:transition', 'Give an action.');
    return Response.json(await transition(actor, p.data.id, body));
  } catch (err) {
    return errorResponse(err);
  }
}
