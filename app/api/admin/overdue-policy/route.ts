import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { getOverduePolicy, overduePolicyInputSchema, setOverduePolicy } from '@/lib/dal/overdue-policy';
import { errorResponse, parseOrThrow } from '@/lib/errors';

/** GET: the overdue policy in force and its history. */
export async function GET() {
  try {
    return Response.json(await getOverduePolicy(await requireUser()));
  } catch (err) {
    return errorResponse(err);
  }
}

/** POST { policy: flag | withdraw, reason }: sets the policy from now on (administrators). */
export async function POST(req: Request) {
  try {
    const actor = await requireUser();
    const body = parseOrThrow(overduePolicyInputSchema, await readJsonBody(req), 'invalid:overdue-policy', 'The policy is not valid.');
    return Response.json(await setOverduePolicy(actor, body));
  } catch (err) {
    return errorResponse(err);
  }
}
