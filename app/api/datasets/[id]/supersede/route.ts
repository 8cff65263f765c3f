import { z } from 'zod';
import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { supersedeDataset } from '@/lib/dal/datasets';
import { datasetIdFrom } from '@/lib/datasets/route-params';
import { AppError, errorResponse } from '@/lib/errors';

const bodySchema = z.object({ by: z.number().int().positive() });

/** Marks this dataset as superseded by a newer one: body { by: newerDatasetId }. */
export async function POST(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const id = await datasetIdFrom(ctx);
    const body = bodySchema.safeParse(await readJsonBody(req));
    if (!body.success) throw new AppError('invalid:supersede', 'Give { by: <id of the newer dataset> }.', { field: 'by' });
    return Response.json({ dataset: await supersedeDataset(actor, id, body.data.by) });
  } catch (err) {
    return errorResponse(err);
  }
}
