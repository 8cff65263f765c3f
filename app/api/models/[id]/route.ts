import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { getModel, modelPatchSchema, updateModel } from '@/lib/dal/models';
import { errorResponse, parseOrThrow } from '@/lib/errors';
import { routeId } from '@/lib/http/route-params';

type Ctx = { params: Promise<{ id: string }> };
const modelId = (ctx: Ctx) => routeId(ctx, 'id', 'not_found:model', 'There is no such model.');

/** GET: a model with the assumptions it uses, its webhook deliveries and its tokens. */
export async function GET(_req: Request, ctx: Ctx) {
  try {
    return Response.json(await getModel(await requireUser(), await modelId(ctx)));
  } catch (err) {
    return errorResponse(err);
  }
}

/** PATCH: changes the model (any of its fields, the assumptions it uses as assumptionIds). */
export async function PATCH(req: Request, ctx: Ctx) {
  try {
    const actor = await requireUser();
    const id = await modelId(ctx);
    const body = parseOrThrow(modelPatchSchema, await readJsonBody(req), 'invalid:model', 'The change is not valid.');
    return Response.json(await updateModel(actor, id, body));
  } catch (err) {
    return errorResponse(err);
  }
}
