import type { Metadata } from 'next';
import Link from 'next/link';
import { z } from 'zod';
import { PairExplorer } from '@/components/pairs/pair-explorer';
import { requireUser } from '@/lib/auth/session';
import { getFitSegment } from '@/lib/dal/fits';
import { AppError } from '@/lib/errors';
import { pd, rho } from '@/lib/format';
import { PAIR_LIMITS } from '@/lib/fits/pair';
import { pairTStartOf } from '@/lib/fits/pair-t';
import { segmentHref } from '@/lib/fits/results';

export const metadata: Metadata = { title: 'Pair explorer' };

/** A start from a fitted pair (the fit review's factor correlations link here); anything else is ignored. */
const pairSchema = z.object({
  pdA: z.coerce.number().min(PAIR_LIMITS.pdMin).max(PAIR_LIMITS.pdMax).optional().catch(undefined),
  pdB: z.coerce.number().min(PAIR_LIMITS.pdMin).max(PAIR_LIMITS.pdMax).optional().catch(undefined),
  rho: z.coerce.number().min(PAIR_LIMITS.rhoMin).max(PAIR_LIMITS.rhoMax).optional().catch(undefined),
});
/** A start from one fitted segment (its review links here): both obligors at its PD, its correlation. */
const segmentSchema = z.object({ fitId: z.coerce.number().int().positive(), segment: z.string().min(1).max(300) });

/**
 * The Pair explorer; `?pdA=&pdB=&rho=` starts it from a fitted pair of segments, `?fitId=N&segment=NAME`
 * from one fitted segment (both obligors at the fitted PD, the fitted correlation).
 */
export default async function PairsPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const actor = await requireUser();
  const sp = await searchParams;
  const pair = pairSchema.parse(sp);
  const fromPair = pair.pdA !== undefined && pair.pdB !== undefined && pair.rho !== undefined;
  const start = segmentSchema.safeParse(sp);
  const fitted =
    !fromPair && start.success
      ? await getFitSegment(actor, start.data.fitId, start.data.segment).catch((err) => {
          if (err instanceof AppError && err.kind === 'not_found') return null;
          throw err;
        })
      : null;
  const chosen = fitted ? fitted.segment.estimates[fitted.segment.chosen] : null;
  const from = fitted && chosen && chosen.rho !== null && chosen.pd !== null ? { pd: chosen.pd, rho: chosen.rho } : null;
  const tFit = fitted ? pairTStartOf(fitted.segment.estimates.tCopula) : null;
  const tStart = fitted && tFit?.kind === 'start' ? { pd: tFit.pd, rho: tFit.rho, nu: tFit.nu, from: `fit #${fitted.fitId}’s t copula` } : null;
  const initial = fromPair
    ? { initialPdA: pair.pdA, initialPdB: pair.pdB, initialRho: pair.rho }
    : from
      ? { initialPdA: from.pd, initialPdB: from.pd, initialRho: from.rho, heading: `Two obligors of ${fitted!.segment.segment}`, tStart }
      : { tStart };
  return (
    <div className="space-y-4">
      <div>
        <h1>Pair explorer</h1>
        <p className="mt-1 max-w-3xl text-sm text-[var(--color-muted)]">
          What an asset correlation means for two obligors: each defaults when its asset value falls below the threshold set by its PD; the
          correlation of the two asset values decides how often they fall together.
        </p>
        {fromPair ? (
          <p className="mt-1 max-w-3xl text-sm" data-testid="pair-from-fit">
            Started from a fitted pair of segments: each obligor&apos;s PD is its segment&apos;s estimate, and the asset correlation is
            sqrt(rho_A rho_B) times the correlation of the two segments&apos; factors.
          </p>
        ) : null}
        {!fromPair && start.success && !from ? (
          <p className="notice-caution mt-2 text-sm" role="note">
            Fit #{start.data.fitId} has no fitted correlation for “{start.data.segment}”: the explorer starts from its usual values.
          </p>
        ) : null}
        {fitted && from ? (
          <p className="mt-2 text-sm" data-testid="pair-from-segment">
            Started from <Link href={segmentHref(fitted.fitId, fitted.segment.segment)}>fit #{fitted.fitId}, {fitted.segment.segment}</Link>: both
            obligors at the fitted PD <span className="num">{pd(from.pd)}</span>, asset correlation <span className="num">{rho(from.rho)}</span>.
          </p>
        ) : null}
        {fitted && tFit?.kind === 'start' ? (
          <p className="mt-1 max-w-3xl text-sm" data-testid="pair-t-from-segment">
            The fit also estimated a Student t copula for this segment (ρ <span className="num">{rho(tFit.rho)}</span>, ν{' '}
            <span className="num">{tFit.nu.toPrecision(4)}</span>, PD <span className="num">{pd(tFit.pd)}</span>): choose “Start the t copula” below to
            explore it. A ν fitted to a few yearly default rates is weakly identified; see its interval on the segment’s review.
          </p>
        ) : null}
        {fitted && tFit?.kind === 'gaussian-limit' ? (
          <p className="mt-1 max-w-3xl text-sm" data-testid="pair-t-from-segment">
            The fit’s Student t copula for this segment reaches the Gaussian limit (ν = ∞; ρ <span className="num">{rho(tFit.rho)}</span>): its
            data show no fatter joint tail, so the explorer keeps the Gaussian copula. You can still choose the t copula and a ν to see what the
            choice would cost.
          </p>
        ) : null}
        {fitted && tFit?.kind === 'none' ? (
          <p className="mt-1 max-w-3xl text-sm text-[var(--color-muted)]" data-testid="pair-t-from-segment">
            The fit’s Student t copula for this segment has no estimate to start from: {tFit.reason}
          </p>
        ) : null}
      </div>
      <section className="panel p-5">
        <PairExplorer key={JSON.stringify(initial)} {...initial} />
      </section>
    </div>
  );
}
