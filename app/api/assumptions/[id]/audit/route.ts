import { z } from 'zod';
import { requireUser } from '@/lib/auth/session';
import { auditCsv, getVersion } from '@/lib/dal/assumptions';
import { AppError, errorResponse } from '@/lib/errors';

const paramsSchema = z.object({ id: z.coerce.number().int().positive() });

/** GET: the audit trail of the assumption this version belongs to, as CSV (cells neutralised). */
export async function GET(_req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const p = paramsSchema.safeParse(await ctx.params);
    if (!p.success) throw new AppError('not_found:assumption', 'There is no such assumption version.');
    const v = await getVersion(actor, p.data.id);
    const { filename, csv } = await auditCsv(actor, v.assumptionId);
    return new Response(csv, {
      headers: { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': `attachment; filename="${filename}"` },
    });
  } catch (err) {
    return errorResponse(err);
  }
}
