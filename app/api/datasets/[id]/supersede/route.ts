import { z } from 'zod';
import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { supersedeDataset } from '@/lib/dal/datasets';
import { datasetIdFrom } from '@/lib/http/route-params';
import { errorResponse, parseOrThrow } from '@/lib/errors';

const GIVE_BY = 'Give { by: <id of the newer dataset> }.';
const bodySchema = z.object({ by: z.number({ message: GIVE_BY }).int(GIVE_BY).positive(GIVE_BY) }, { message: GIVE_BY });

/** Marks this dataset as superseded by a newer one: body { by: newerDatasetId }. */
export async function POST(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const id = await datasetIdFrom(ctx);
    const body = parseOrThrow(bodySchema, await readJsonBody(req), 'invalid:supersede', GIVE_BY);
    return Response.json({ dataset: await supersedeDataset(actor, id, body.by) });
  } catch (err) {
    return errorResponse(err);
  }
}
