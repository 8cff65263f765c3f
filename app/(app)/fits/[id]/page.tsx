import { HydrationBoundary } from '@tanstack/react-query';
import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { z } from 'zod';
import { FitProgress } from '@/components/fits/fit-progress';
import { SegmentReview } from '@/components/fits/segment-review';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { fitStatusQuery } from '@/lib/client/fits';
import { dehydrated } from '@/lib/client/prefetch';
import { getFit } from '@/lib/dal/fits';
import { AppError } from '@/lib/errors';
import { isCurrentResults, segmentsInOrder } from '@/lib/fits/results';

export const metadata: Metadata = { title: 'Fit review' };

const paramsSchema = z.object({ id: z.coerce.number().int().positive() });

export default async function FitPage({ params }: { params: Promise<{ id: string }> }) {
  const actor = await requireUser();
  const p = paramsSchema.safeParse(await params);
  if (!p.success) notFound();
  const fit = await getFit(actor, p.data.id).catch((err) => {
    if (err instanceof AppError && err.status === 404) notFound();
    throw err;
  });
  const r = fit.request;
  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <div>
          <p className="text-sm">
            <Link href="/fits">Fits</Link> /
          </p>
          <h1>Fit #{fit.id}</h1>
          <p className="mt-1 text-sm text-[var(--color-muted)]" data-testid="fit-provenance">
            Dataset <Link href={`/data/${fit.datasetId}`}>#{fit.datasetId} {fit.datasetName}</Link> · SHA-256{' '}
            <code className="text-xs">{fit.datasetSha256.slice(0, 12)}…</code> · window {r.from === undefined && r.to === undefined ? 'all periods' : `${r.from ?? 'first'}–${r.to ?? 'last'}`} · level{' '}
            {Math.round(r.level * 100)}% · bootstrap {r.bootstrap ? `B ${r.bootstrap.replications}, seed ${r.bootstrap.seed}` : 'none'} · audit{' '}
            {r.audit ? `R ${r.audit.replications}, seed ${r.audit.seed}` : 'none'} · engine {fit.engineVersion} · started by {fit.createdBy}{' '}
            {fit.createdAt.replace('T', ' ').slice(0, 16)} UTC
          </p>
        </div>
        {fit.status === 'succeeded' && fit.segments.length > 0 ? (
          <Link className="btn btn-quiet" href={`/fits?segment=${encodeURIComponent(fit.segments[0])}`}>
            Compare with other runs
          </Link>
        ) : null}
      </div>

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

      {fit.results && !isCurrentResults(fit.results) ? (
        <p className="notice-caution text-sm" data-testid="old-results">
          This run&apos;s results were stored in an older layout (engine {fit.engineVersion}, before the review had all its current
          parts), so they are not drawn here; they are kept as stored and answered by GET /api/fits/{fit.id}. Start a new fit on the
          same dataset to review it here.
        </p>
      ) : null}

      {fit.results && isCurrentResults(fit.results) ? (
        <>
          {fit.results.segments.length > 1 ? (
            <nav aria-label="Segments of this fit" className="flex flex-wrap gap-2 text-sm">
              {fit.results.segments.map((s, i) => (
                <a key={s.segment} href={`#segment-${i}`} className="badge no-underline">
                  {s.segment}
                </a>
              ))}
            </nav>
          ) : null}
          {segmentsInOrder(fit.results).map((item) =>
            item.kind === 'failed' ? (
              <section key={`failed-${item.failure.segment}`} className="panel notice-caution p-4" data-testid="segment-failed" aria-labelledby={`failed-${item.failure.position}`}>
                <h2 id={`failed-${item.failure.position}`}>{item.failure.segment}</h2>
                <p className="mt-1 text-sm">
                  This segment was not fitted: {item.failure.reason} The other segments of this run were fitted as usual.
                </p>
              </section>
            ) : (
            <div key={item.fit.segment} id={`segment-${item.index}`} className="space-y-2">
              {can(actor.role, 'assumptions:draft') && item.fit.estimates.binomialMle.rho !== null ? (
                <div className="flex justify-end">
                  <Link
                    className="btn btn-quiet text-sm"
                    href={`/library/new?fitId=${fit.id}&segment=${encodeURIComponent(item.fit.segment)}`}
                    data-testid={`draft-from-fit-${item.index}`}
                  >
                    Draft an assumption for {item.fit.segment} from this fit
                  </Link>
                </div>
              ) : null}
              <SegmentReview seg={item.fit} index={item.index} bootstrapRequested={!!r.bootstrap} />
            </div>
            ),
          )}
          <p className="notice-caution text-sm">
            The Gaussian one-factor model has no tail dependence and one constant correlation; 10–25 yearly observations give wide
            intervals and a downward bias. These numbers support a judgement: they do not replace independent validation, local
            regulation or licensed practice, and approval in Rhobook is not a regulator&apos;s approval.
          </p>
        </>
      ) : null}
    </div>
  );
}
