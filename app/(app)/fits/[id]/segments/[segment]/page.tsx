import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { z } from 'zod';
import { Cautions } from '@/components/assumptions/cautions';
import { FitProvenance, OldResultsNotice } from '@/components/fits/fit-provenance';
import { SegmentEvidence } from '@/components/fits/review/segment-evidence';
import { SegmentPager } from '@/components/fits/segment-pager';
import { Breadcrumbs } from '@/components/layout/breadcrumbs';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { getFit } from '@/lib/dal/fits';
import { lowDefaultThreshold } from '@/lib/env';
import { AppError } from '@/lib/errors';
import { findSegment, isCurrentResults } from '@/lib/fits/results';

const paramsSchema = z.object({ id: z.coerce.number().int().positive(), segment: z.string().min(1).max(300) });

type Params = { params: Promise<{ id: string; segment: string }> };

export async function generateMetadata({ params }: Params): Promise<Metadata> {
  const p = paramsSchema.safeParse(await params);
  if (!p.success) return { title: 'Segment review' };
  let name = p.data.segment;
  try {
    name = decodeURIComponent(name);
  } catch {
    // shown as given
  }
  return { title: `${name} · fit #${p.data.id}` };
}

/** One segment of a fit: its review, section by section, with a side index. */
export default async function SegmentReviewPage({ params }: Params) {
  const actor = await requireUser();
  const p = paramsSchema.safeParse(await params);
  if (!p.success) notFound();
  const fit = await getFit(actor, p.data.id).catch((err) => {
    if (err instanceof AppError && err.status === 404) notFound();
    throw err;
  });
  const trail = [
    { href: '/fits', label: 'Fits' },
    { href: `/fits/${fit.id}`, label: `Fit #${fit.id}` },
  ];
  if (!fit.results || !isCurrentResults(fit.results)) {
    return (
      <div className="space-y-4">
        <Breadcrumbs trail={trail} current="Segment" />
        {fit.results ? (
          <OldResultsNotice fitId={fit.id} engineVersion={fit.engineVersion} />
        ) : (
          <p className="notice-caution text-sm">
            This fit has no results yet: follow it on <Link href={`/fits/${fit.id}`}>its page</Link>.
          </p>
        )}
      </div>
    );
  }
  const found = findSegment(fit.results, p.data.segment);
  if (!found) notFound();
  const name = 'fit' in found ? found.fit.segment : found.failure.segment;
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div className="min-w-0">
          <Breadcrumbs trail={trail} current={name} />
          <h1 className="break-words">{name}</h1>
          <FitProvenance fit={fit} />
        </div>
        <div className="flex flex-wrap gap-2">
          {'fit' in found && can(actor.role, 'assumptions:draft') && found.fit.estimates.binomialMle.rho !== null ? (
            <Link className="btn no-underline" href={`/library/new?fitId=${fit.id}&segment=${encodeURIComponent(name)}`} data-testid="draft-from-segment">
              Draft an assumption from this segment
            </Link>
          ) : null}
          <Link className="btn btn-quiet no-underline" href={`/fits?segment=${encodeURIComponent(name)}`}>
            Other runs of {name}
          </Link>
        </div>
      </div>
      <SegmentPager fitId={fit.id} results={fit.results} current={name} />
      {'fit' in found ? (
        <SegmentEvidence seg={found.fit} idPrefix="review" bootstrapRequested={!!fit.request.bootstrap} fitId={fit.id} lowDefaultThreshold={lowDefaultThreshold()} />
      ) : (
        <section className="panel notice-caution p-4" data-testid="segment-failed">
          <p className="text-sm">This segment was not fitted: {found.failure.reason} The other segments of this run were fitted as usual.</p>
        </section>
      )}
      <Cautions title="These numbers support a judgement: read them with care." />
    </div>
  );
}
