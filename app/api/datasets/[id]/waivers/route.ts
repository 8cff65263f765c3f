import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { waiverSchema, waiveWarnings } from '@/lib/dal/datasets';
import { datasetIdFrom } from '@/lib/datasets/route-params';
import { AppError, errorResponse } from '@/lib/errors';

/** Waives one warning rule on a dataset: body { rule, reason }. 201 with the dataset's waivers. */
export async function POST(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const id = await datasetIdFrom(ctx);
    const body = waiverSchema.safeParse(await readJsonBody(req));
    if (!body.success) {
      const first = body.error.issues[0];
      throw new AppError('invalid:waiver', first?.message ?? 'Give { rule, reason }.', { field: first?.path.join('.') ?? null });
    }
    return Response.json({ waivers: await waiveWarnings(actor, id, body.data) }, { status: 201 });
  } catch (err) {
    return errorResponse(err);
  }
}
