import { z } from 'zod';
import { roles } from '@/db/schema';
import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { changeRole, setUserActive } from '@/lib/dal/users';
import { AppError, errorResponse } from '@/lib/errors';

const paramsSchema = z.object({ id: z.coerce.number().int().positive() });
const patchSchema = z
  .object({ role: z.enum(roles).optional(), active: z.boolean().optional() })
  .refine((v) => v.role !== undefined || v.active !== undefined, 'Give a role or an active flag to change.');

export async function PATCH(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const params = paramsSchema.safeParse(await ctx.params);
    if (!params.success) throw new AppError('not_found:user', 'There is no such user.');
    const body = patchSchema.safeParse(await readJsonBody(req));
    if (!body.success) throw new AppError('invalid:user', body.error.issues[0]?.message ?? 'The change is not valid.');
    let user;
    if (body.data.role !== undefined) user = await changeRole(actor, params.data.id, body.data.role);
    if (body.data.active !== undefined) user = await setUserActive(actor, params.data.id, body.data.active);
    return Response.json({ user });
  } catch (err) {
    return errorResponse(err);
  }
}
