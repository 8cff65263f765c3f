import { assertSameOrigin } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { cancelFit } from '@/lib/dal/fits';
import { errorResponse } from '@/lib/errors';
import { routeId } from '@/lib/http/route-params';

export async function POST(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    assertSameOrigin(req);
    const id = await routeId(ctx, 'id', 'not_found:fit', 'There is no such fit run.');
    return Response.json(await cancelFit(actor, id));
  } catch (err) {
    return errorResponse(err);
  }
}
