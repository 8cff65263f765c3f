import { requireUser } from '@/lib/auth/session';
import { getFit } from '@/lib/dal/fits';
import { errorResponse } from '@/lib/errors';
import { routeId } from '@/lib/http/route-params';

/** { id, status, progress, message, request, results, error } plus the run's provenance. */
export async function GET(_req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const id = await routeId(ctx, 'id', 'not_found:fit', 'There is no such fit run.');
    return Response.json(await getFit(actor, id));
  } catch (err) {
    return errorResponse(err);
  }
}
