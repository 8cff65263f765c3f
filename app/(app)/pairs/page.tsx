import type { Metadata } from 'next';
import { PairExplorer } from '@/components/pairs/pair-explorer';
import { requireUser } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Pair explorer' };

export default async function PairsPage() {
  await requireUser();
  return (
    <div className="space-y-4">
      <div>
        <h1>Pair explorer</h1>
        <p className="mt-1 max-w-3xl text-sm text-[var(--color-muted)]">
          What an asset correlation means for two obligors: each defaults when its asset value falls below the
          threshold set by its PD; the correlation of the two asset values decides how often they fall together.
        </p>
      </div>
      <section className="panel p-5">
        <PairExplorer />
      </section>
    </div>
  );
}
