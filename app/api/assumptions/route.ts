import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { createDraft, listLibrary } from '@/lib/dal/assumptions';
import { errorResponse, parseOrThrow } from '@/lib/errors';
import { draftInputSchema } from '@/lib/assumptions/content';

/**
 * GET: the library by segment (signed-in users), filtered as the library screen is
 * (`?segment=&state=&asOf=`). POST: an analyst drafts a version from a fit: 201 { id }.
 */
export async function GET(req: Request) {
  try {
    const actor = await requireUser();
    return Response.json({ library: await listLibrary(actor, new Date(), Object.fromEntries(new URL(req.url).searchParams)) });
  } catch (err) {
    return errorResponse(err);
  }
}

export async function POST(req: Request) {
  try {
    const actor = await requireUser();
    const body = await readJsonBody(req);
    const v = await createDraft(actor, parseOrThrow(draftInputSchema, body, 'invalid:assumption', 'The draft is not valid.'));
    return Response.json({ id: v.id, status: v.status, version: v.version, assumptionId: v.assumptionId }, { status: 201 });
  } catch (err) {
    return errorResponse(err);
  }
}
