import { requireUser } from '@/lib/auth/session';
import { getUploadReport } from '@/lib/dal/datasets';
import { reportIdFrom } from '@/lib/http/route-params';
import { errorResponse } from '@/lib/errors';
import { findingsToCsv } from '@/lib/ingest/export';

/** An upload's data check report as CSV; text from the file is neutralised against spreadsheet formulas. */
export async function GET(_req: Request, ctx: { params: Promise<{ reportId: string }> }) {
  try {
    const actor = await requireUser();
    const r = await getUploadReport(actor, await reportIdFrom(ctx));
    const findings = r.issues.map((i) => ({ line: i.row, column: i.column, rule: i.rule, severity: i.severity, value: i.value, message: i.message }));
    return new Response(findingsToCsv(findings), {
      headers: { 'Content-Type': 'text/csv; charset=utf-8', 'Content-Disposition': `attachment; filename="upload-report-${r.id}.csv"` },
    });
  } catch (err) {
    return errorResponse(err);
  }
}
