import { requireUser } from '@/lib/auth/session';
import { getUploadReport } from '@/lib/dal/datasets';
import { reportIdFrom } from '@/lib/http/route-params';
import { errorResponse } from '@/lib/errors';

/** An upload report (also of a rejected upload, for its uploader), with the conversion job's progress. */
export async function GET(_req: Request, ctx: { params: Promise<{ reportId: string }> }) {
  try {
    const actor = await requireUser();
    return Response.json({ report: await getUploadReport(actor, await reportIdFrom(ctx)) });
  } catch (err) {
    return errorResponse(err);
  }
}
