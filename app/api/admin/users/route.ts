import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { createUser, createUserSchema, listUsers } from '@/lib/dal/users';
import { errorResponse, parseOrThrow } from '@/lib/errors';

export async function GET() {
  try {
    const actor = await requireUser();
    return Response.json({ users: await listUsers(actor) });
  } catch (err) {
    return errorResponse(err);
  }
}

export async function POST(req: Request) {
  try {
    const actor = await requireUser();
    const body = parseOrThrow(createUserSchema, await readJsonBody(req), 'invalid:user', 'The user details are not valid.');
    const result = await createUser(actor, body);
    return Response.json(result, { status: 201 });
  } catch (err) {
    return errorResponse(err);
  }
}
