import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { createToken, createTokenSchema, listTokens } from '@/lib/dal/tokens';
import { errorResponse, parseOrThrow } from '@/lib/errors';

export async function GET() {
  try {
    const actor = await requireUser();
    return Response.json({ tokens: await listTokens(actor) });
  } catch (err) {
    return errorResponse(err);
  }
}

/** POST { name, scopes, expiresInDays? }: 201 with the token's secret, shown this once. */
export async function POST(req: Request) {
  try {
    const actor = await requireUser();
    const body = parseOrThrow(createTokenSchema, await readJsonBody(req), 'invalid:token', 'The token details are not valid.');
    return Response.json(await createToken(actor, body), { status: 201 });
  } catch (err) {
    return errorResponse(err);
  }
}
