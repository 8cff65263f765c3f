import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { ReportView } from '@/components/reports/report-view';
import { requireUser } from '@/lib/auth/session';
import { assumptionReportDocument } from '@/lib/dal/reports';
import { AppError } from '@/lib/errors';
import { routeId } from '@/lib/http/route-params';

export const metadata: Metadata = { title: 'Assumption report' };

export default async function AssumptionReportPage({ params }: { params: Promise<{ id: string }> }) {
  const actor = await requireUser();
  const id = await routeId({ params }, 'id', 'not_found:assumption', 'There is no such assumption version.').catch(() => notFound());
  const report = await assumptionReportDocument(actor, id).catch((err) => {
    if (err instanceof AppError && err.kind === 'not_found') notFound();
    throw err;
  });
  return <ReportView report={report} pdfHref={`/api/assumptions/${id}/report.pdf`} backHref={`/library/versions/${id}`} backLabel="The version" />;
}
