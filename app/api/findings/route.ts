import { z } from 'zod';
import { findingTargets } from '@/db/schema';
import { readJsonBody } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { listFindings, recordFinding } from '@/lib/dal/findings';
import { errorResponse, parseOrThrow } from '@/lib/errors';
import { findingInputSchema } from '@/lib/findings/rules';

const querySchema = z.object({
  targetType: z.enum(findingTargets, { message: 'targetType is fit, dataset or version.' }).optional(),
  targetId: z.coerce.number().int().positive('targetId is a positive whole number.').optional(),
  unresolved: z.enum(['1', '0']).optional(),
});

/** GET ?targetType=&targetId=&unresolved=1: findings, unresolved first. */
export async function GET(req: Request) {
  try {
    const actor = await requireUser();
    const url = new URL(req.url);
    const q = parseOrThrow(querySchema, Object.fromEntries(url.searchParams), 'bad_request:query', 'The query is not valid.');
    const targets = q.targetType && q.targetId ? [{ type: q.targetType, id: q.targetId }] : undefined;
    return Response.json({ findings: await listFindings(actor, { targets, unresolved: q.unresolved === '1' }) });
  } catch (err) {
    return errorResponse(err);
  }
}

/** POST { targetType, targetId, title, description, severity, ownerId, dueDate }: records a finding (validators). */
export async function POST(req: Request) {
  try {
    const actor = await requireUser();
    const body = parseOrThrow(findingInputSchema, await readJsonBody(req), 'invalid:finding', 'The finding is not valid.');
    return Response.json(await recordFinding(actor, body), { status: 201 });
  } catch (err) {
    return errorResponse(err);
  }
}
