import { assertSameOrigin } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { pingModel } from '@/lib/dal/models';
import { errorResponse } from '@/lib/errors';
import { routeId } from '@/lib/http/route-params';

/** POST: queues a test event to the model's webhook (202; the worker sends it). */
export async function POST(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    assertSameOrigin(req);
    const actor = await requireUser();
    return Response.json(await pingModel(actor, await routeId(ctx, 'id', 'not_found:model', 'There is no such model.')), { status: 202 });
  } catch (err) {
    return errorResponse(err);
  }
}
