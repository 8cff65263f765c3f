import { assertSameOrigin } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { rotateWebhookSecret } from '@/lib/dal/models';
import { errorResponse } from '@/lib/errors';
import { routeId } from '@/lib/http/route-params';

/** POST: a new webhook secret for the model, answered this once. */
export async function POST(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    assertSameOrigin(req);
    const actor = await requireUser();
    return Response.json(await rotateWebhookSecret(actor, await routeId(ctx, 'id', 'not_found:model', 'There is no such model.')));
  } catch (err) {
    return errorResponse(err);
  }
}
