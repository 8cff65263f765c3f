import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { createMatrixDraft } from '@/lib/dal/factor-matrices';
import { errorResponse, parseOrThrow } from '@/lib/errors';
import { matrixDraftSchema } from '@/lib/factor-matrices/content';

/** POST: an analyst drafts a factor-correlation matrix version from a fit with pairs: 201 { id, matrixId, version, status }. */
export async function POST(req: Request) {
  try {
    const actor = await requireUser();
    const body = parseOrThrow(matrixDraftSchema, await readJsonBody(req), 'invalid:assumption', 'The matrix draft is not valid.');
    const v = await createMatrixDraft(actor, body);
    return Response.json({ id: v.id, matrixId: v.matrixId, version: v.version, status: v.status }, { status: 201 });
  } catch (err) {
    return errorResponse(err);
  }
}
