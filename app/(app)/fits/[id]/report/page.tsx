import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { ReportView } from '@/components/reports/report-view';
import { requireUser } from '@/lib/auth/session';
import { fitReportDocument } from '@/lib/dal/reports';
import { AppError } from '@/lib/errors';
import { routeId } from '@/lib/http/route-params';

export const metadata: Metadata = { title: 'Fit report' };

export default async function FitReportPage({ params }: { params: Promise<{ id: string }> }) {
  const actor = await requireUser();
  const id = await routeId({ params }, 'id', 'not_found:fit', 'There is no such fit run.').catch(() => notFound());
  const report = await fitReportDocument(actor, id).catch((err) => {
    if (err instanceof AppError && err.kind === 'not_found') notFound();
    throw err;
  });
  return <ReportView report={report} pdfHref={`/api/fits/${id}/report.pdf`} backHref={`/fits/${id}`} backLabel={`Fit ${id}`} />;
}
