import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { createUser, createUserSchema, listUsers } from '@/lib/dal/users';
import { AppError, errorResponse } from '@/lib/errors';

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
    const body = createUserSchema.safeParse(await readJsonBody(req));
    if (!body.success) {
      throw new AppError('invalid:user', body.error.issues[0]?.message ?? 'The user details are not valid.');
    }
    const result = await createUser(actor, body.data);
    return Response.json(result, { status: 201 });
  } catch (err) {
    return errorResponse(err);
  }
}
