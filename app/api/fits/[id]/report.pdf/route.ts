import { requireUser } from '@/lib/auth/session';
import { fitReportDocument } from '@/lib/dal/reports';
import { errorResponse } from '@/lib/errors';
import { routeId } from '@/lib/http/route-params';
import { renderReportPdf } from '@/lib/reports/pdf';

/** GET: the fit's report as a PDF (made on the server). */
export async function GET(_req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const doc = await fitReportDocument(actor, await routeId(ctx, 'id', 'not_found:fit', 'There is no such fit run.'));
    const pdf = await renderReportPdf(doc);
    return new Response(new Uint8Array(pdf), {
      headers: { 'content-type': 'application/pdf', 'content-disposition': `attachment; filename="${doc.fileBase}.pdf"`, 'cache-control': 'no-store' },
    });
  } catch (err) {
    return errorResponse(err);
  }
}
