import type { Metadata } from 'next';
import { z } from 'zod';
import { PairExplorer } from '@/components/pairs/pair-explorer';
import { requireUser } from '@/lib/auth/session';
import { PAIR_LIMITS } from '@/lib/fits/pair';

export const metadata: Metadata = { title: 'Pair explorer' };

/** A start from a fitted pair (the fit review's factor correlations link here); anything else is ignored. */
const startSchema = z.object({
  pdA: z.coerce.number().min(PAIR_LIMITS.pdMin).max(PAIR_LIMITS.pdMax).optional().catch(undefined),
  pdB: z.coerce.number().min(PAIR_LIMITS.pdMin).max(PAIR_LIMITS.pdMax).optional().catch(undefined),
  rho: z.coerce.number().min(PAIR_LIMITS.rhoMin).max(PAIR_LIMITS.rhoMax).optional().catch(undefined),
});

export default async function PairsPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  await requireUser();
  const start = startSchema.parse(await searchParams);
  const fromFit = start.pdA !== undefined && start.pdB !== undefined && start.rho !== undefined;
  return (
    <div className="space-y-4">
      <div>
        <h1>Pair explorer</h1>
        <p className="mt-1 max-w-3xl text-sm text-[var(--color-muted)]">
          What an asset correlation means for two obligors: each defaults when its asset value falls below the
          threshold set by its PD; the correlation of the two asset values decides how often they fall together.
        </p>
        {fromFit ? (
          <p className="mt-1 max-w-3xl text-sm" data-testid="pair-from-fit">
            Started from a fitted pair of segments: each obligor&apos;s PD is its segment&apos;s estimate, and the asset correlation is
            sqrt(rho_A rho_B) times the correlation of the two segments&apos; factors.
          </p>
        ) : null}
      </div>
      <section className="panel p-5">
        <PairExplorer {...(start.pdA !== undefined ? { initialPdA: start.pdA } : {})} {...(start.pdB !== undefined ? { initialPdB: start.pdB } : {})} {...(start.rho !== undefined ? { initialRho: start.rho } : {})} />
      </section>
    </div>
  );
}
