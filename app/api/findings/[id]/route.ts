import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { changeFinding, getFinding } from '@/lib/dal/findings';
import { errorResponse, parseOrThrow } from '@/lib/errors';
import { findingChangeSchema } from '@/lib/findings/rules';
import { routeId } from '@/lib/http/route-params';

type Ctx = { params: Promise<{ id: string }> };
const findingId = (ctx: Ctx) => routeId(ctx, 'id', 'not_found:finding', 'There is no such finding.');

/** GET: a finding with its history and what I may do with it. */
export async function GET(_req: Request, ctx: Ctx) {
  try {
    const actor = await requireUser();
    return Response.json(await getFinding(actor, await findingId(ctx)));
  } catch (err) {
    return errorResponse(err);
  }
}

/** PATCH { status?, comment? }: a status change (with its comment; accepting needs the rationale) or a comment. */
export async function PATCH(req: Request, ctx: Ctx) {
  try {
    const actor = await requireUser();
    const id = await findingId(ctx);
    const body = parseOrThrow(findingChangeSchema, await readJsonBody(req), 'invalid:finding', 'The change is not valid.');
    return Response.json(await changeFinding(actor, id, body));
  } catch (err) {
    return errorResponse(err);
  }
}
