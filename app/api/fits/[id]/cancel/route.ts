import { z } from 'zod';
import { assertSameOrigin } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { cancelFit } from '@/lib/dal/fits';
import { AppError, errorResponse } from '@/lib/errors';

const paramsSchema = z.object({ id: z.coerce.number().int().positive() });

export async function POST(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    assertSameOrigin(req);
    const p = paramsSchema.safeParse(await params);
    if (!p.success) throw new AppError('not_found:fit', 'There is no such fit run.');
    return Response.json(await cancelFit(actor, p.data.id));
  } catch (err) {
    return errorResponse(err);
  }
}
