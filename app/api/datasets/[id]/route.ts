import { assertSameOrigin } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { deleteDataset, getDataset } from '@/lib/dal/datasets';
import { datasetIdFrom } from '@/lib/http/route-params';
import { errorResponse } from '@/lib/errors';

export async function GET(_req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    return Response.json({ dataset: await getDataset(actor, await datasetIdFrom(ctx)) });
  } catch (err) {
    return errorResponse(err);
  }
}

/** 204 when deleted; 409 `conflict:dataset-in-use` when a fit or an assumption refers to it. */
export async function DELETE(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    assertSameOrigin(req);
    await deleteDataset(actor, await datasetIdFrom(ctx));
    return new Response(null, { status: 204 });
  } catch (err) {
    return errorResponse(err);
  }
}
