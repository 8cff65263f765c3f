import { assertSameOrigin } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { revokeToken } from '@/lib/dal/tokens';
import { errorResponse } from '@/lib/errors';
import { routeId } from '@/lib/http/route-params';

/** DELETE: revokes the token (kept on record, refused from now on). */
export async function DELETE(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    assertSameOrigin(req);
    await revokeToken(actor, await routeId(ctx, 'id', 'not_found:token', 'There is no such API token.'));
    return new Response(null, { status: 204 });
  } catch (err) {
    return errorResponse(err);
  }
}
