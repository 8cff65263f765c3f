import { HydrationBoundary } from '@tanstack/react-query';
import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { z } from 'zod';
import { FindingsSection } from '@/components/findings/findings-section';
import { ReportLinks } from '@/components/reports/report-links';
import { FitDefaultDefinitions } from '@/components/fits/fit-default-definitions';
import { Cautions } from '@/components/assumptions/cautions';
import { FitProgress } from '@/components/fits/fit-progress';
import { FitProvenance, OldResultsNotice } from '@/components/fits/fit-provenance';
import { SegmentsOverview } from '@/components/fits/segments-overview';
import { Breadcrumbs } from '@/components/layout/breadcrumbs';
import { GroupResults, PairMatrix } from '@/components/fits/portfolio-review';
import { todayIso } from '@/lib/assumptions/dates';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { fitStatusQuery } from '@/lib/client/fits';
import { dehydrated } from '@/lib/client/prefetch';
import { findingsPanel } from '@/lib/dal/findings';
import { getFit } from '@/lib/dal/fits';
import { AppError } from '@/lib/errors';
import { isCurrentResults } from '@/lib/fits/results';

export const metadata: Metadata = { title: 'Fit' };

const paramsSchema = z.object({ id: z.coerce.number().int().positive() });

/** A fit run: its provenance, its progress while it runs, then the overview of its segments. */
export default async function FitPage({ params }: { params: Promise<{ id: string }> }) {
  const actor = await requireUser();
  const p = paramsSchema.safeParse(await params);
  if (!p.success) notFound();
  const fit = await getFit(actor, p.data.id).catch((err) => {
    if (err instanceof AppError && err.status === 404) notFound();
    throw err;
  });
  const findings = await findingsPanel(actor, { type: 'fit', id: fit.id });
  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-end justify-between gap-2">
        <div>
          <Breadcrumbs trail={[{ href: '/fits', label: 'Fits' }]} current={`Fit #${fit.id}`} />
          <h1>Fit #{fit.id}</h1>
          <FitProvenance fit={fit} />
        </div>
        {fit.status === 'succeeded' && fit.segments.length > 0 ? (
          <div className="flex flex-wrap gap-2">
            <ReportLinks page={`/fits/${fit.id}/report`} pdf={`/api/fits/${fit.id}/report.pdf`} />
            <Link className="btn btn-quiet" href={`/fits?segment=${encodeURIComponent(fit.segments[0])}`}>
              Compare with other runs
            </Link>
          </div>
        ) : null}
      </div>

      <FitDefaultDefinitions definitions={fit.defaultDefinitions} />

      {fit.status !== 'succeeded' ? (
        <HydrationBoundary
          state={dehydrated((qc) =>
            qc.setQueryData(fitStatusQuery(fit.id).queryKey, {
              id: fit.id,
              status: fit.status,
              progress: fit.progress,
              message: fit.message,
              error: fit.error,
              mayCancel: fit.mayCancel,
            }),
          )}
        >
          <FitProgress id={fit.id} renderedStatus={fit.status} />
        </HydrationBoundary>
      ) : null}

      {fit.results && !isCurrentResults(fit.results) ? <OldResultsNotice fitId={fit.id} engineVersion={fit.engineVersion} /> : null}

      {fit.results && isCurrentResults(fit.results) ? (
        <>
          <section className="panel p-4" aria-labelledby="overview-heading">
            <h2 id="overview-heading" className="mb-1">
              Segments of this fit
            </h2>
            <p className="mb-2 text-sm text-[var(--color-muted)]">
              Each segment has its own review page with the charts, diagnostics and the small-sample simulation study.
            </p>
            <SegmentsOverview fitId={fit.id} results={fit.results} mayDraft={can(actor.role, 'assumptions:draft')} />
          </section>
          {fit.results.group ? <GroupResults group={fit.results.group} /> : null}
          {fit.results.pairs ? <PairMatrix pairs={fit.results.pairs} fitId={fit.id} mayDraft={can(actor.role, 'assumptions:draft')} today={todayIso()} /> : null}
          <Cautions title="These numbers support a judgement: read them with care." />
        </>
      ) : null}
      <FindingsSection {...findings} />
    </div>
  );
}
