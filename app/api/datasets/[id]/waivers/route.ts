import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { waiverSchema, waiveWarnings } from '@/lib/dal/datasets';
import { datasetIdFrom } from '@/lib/http/route-params';
import { errorResponse, parseOrThrow } from '@/lib/errors';

/** Waives one warning rule on a dataset: body { rule, reason }. 201 with the dataset's waivers. */
export async function POST(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const id = await datasetIdFrom(ctx);
    const body = parseOrThrow(waiverSchema, await readJsonBody(req), 'invalid:waiver', 'Give { rule, reason }.');
    return Response.json({ waivers: await waiveWarnings(actor, id, body) }, { status: 201 });
  } catch (err) {
    return errorResponse(err);
  }
}
