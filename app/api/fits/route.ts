import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { createFit, listFits } from '@/lib/dal/fits';
import { errorResponse } from '@/lib/errors';

export async function GET() {
  try {
    const actor = await requireUser();
    return Response.json({ fits: await listFits(actor) });
  } catch (err) {
    return errorResponse(err);
  }
}

/** Requests a fit: 202 { id, status: 'queued' }; the body is validated by the DAL (422 naming the field). */
export async function POST(req: Request) {
  try {
    const actor = await requireUser();
    const created = await createFit(actor, await readJsonBody(req));
    return Response.json(created, { status: 202, headers: { Location: `/api/fits/${created.id}` } });
  } catch (err) {
    return errorResponse(err);
  }
}
