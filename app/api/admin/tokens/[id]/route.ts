import { z } from 'zod';
import { assertSameOrigin } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { revokeToken } from '@/lib/dal/tokens';
import { AppError, errorResponse } from '@/lib/errors';

const paramsSchema = z.object({ id: z.coerce.number().int().positive() });

/** DELETE: revokes the token (kept on record, refused from now on). */
export async function DELETE(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    assertSameOrigin(req);
    const p = paramsSchema.safeParse(await ctx.params);
    if (!p.success) throw new AppError('not_found:token', 'There is no such API token.');
    await revokeToken(actor, p.data.id);
    return new Response(null, { status: 204 });
  } catch (err) {
    return errorResponse(err);
  }
}
