import { requireUser } from '@/lib/auth/session';
import { getDataset } from '@/lib/dal/datasets';
import { datasetIdFrom } from '@/lib/http/route-params';
import { AppError, errorResponse } from '@/lib/errors';
import { findingsToCsv } from '@/lib/ingest/export';

/** The data check report of the dataset's upload as CSV (line, column, rule, severity, value, message). */
export async function GET(_req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const d = await getDataset(actor, await datasetIdFrom(ctx));
    if (!d.report) throw new AppError('not_found:report', 'This dataset has no upload report.');
    const findings = d.report.issues.map((i) => ({ line: i.row, column: i.column, rule: i.rule, severity: i.severity, value: i.value, message: i.message }));
    return new Response(findingsToCsv(findings), {
      headers: { 'Content-Type': 'text/csv; charset=utf-8', 'Content-Disposition': `attachment; filename="dataset-${d.id}-report.csv"` },
    });
  } catch (err) {
    return errorResponse(err);
  }
}
