import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { createModel, listModels, modelInputSchema } from '@/lib/dal/models';
import { errorResponse, parseOrThrow } from '@/lib/errors';

/** GET: the register of consuming models. */
export async function GET() {
  try {
    return Response.json({ models: await listModels(await requireUser()) });
  } catch (err) {
    return errorResponse(err);
  }
}

/** POST { name, ownerName, contactEmail, intendedUse, webhookUrl?, assumptionIds? }: registers a model (201; the webhook secret once). */
export async function POST(req: Request) {
  try {
    const actor = await requireUser();
    const body = parseOrThrow(modelInputSchema, await readJsonBody(req), 'invalid:model', 'The model is not valid.');
    return Response.json(await createModel(actor, body), { status: 201 });
  } catch (err) {
    return errorResponse(err);
  }
}
