import { z } from 'zod';
import { roles } from '@/db/schema';
import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { changeRole, setUserActive } from '@/lib/dal/users';
import { errorResponse, parseOrThrow } from '@/lib/errors';
import { routeId } from '@/lib/http/route-params';

const patchSchema = z
  .object({ role: z.enum(roles).optional(), active: z.boolean().optional() })
  .refine((v) => v.role !== undefined || v.active !== undefined, 'Give a role or an active flag to change.');

export async function PATCH(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const id = await routeId(ctx, 'id', 'not_found:user', 'There is no such user.');
    const body = parseOrThrow(patchSchema, await readJsonBody(req), 'invalid:user', 'The change is not valid.');
    let user;
    if (body.role !== undefined) user = await changeRole(actor, id, body.role);
    if (body.active !== undefined) user = await setUserActive(actor, id, body.active);
    return Response.json({ user });
  } catch (err) {
    return errorResponse(err);
  }
}
