import { count, pd } from '@/lib/format';
import { BandsChart } from '../bands-chart';
import type { ReviewContext } from './types';

/**
 * The observed default rates against the fitted default-rate distribution, with the in-sample
 * quantile exceedances (not a backtest: the quantiles come from the same years they are counted on).
 */
export function BandsSection({ seg }: ReviewContext) {
  const d = seg.diagnostics;
  if (!d.bands || !d.exceedances) {
    return <p className="text-sm text-[var(--color-muted)]">{d.fittedNote ?? 'No fitted distribution to draw.'}</p>;
  }
  const e = d.exceedances;
  return (
    <div className="grid gap-4 xl:grid-cols-[3fr_2fr]">
      <BandsChart periods={seg.periods} rates={seg.observed.map((o) => o.dr)} bands={d.bands} q95={e.q95} q99={e.q99} />
      <div className="space-y-2 text-sm">
        <p data-testid="exceedances">
          Quantile exceedances: {e.above95} of {count(seg.T, 'period')} lie above the fitted 95% quantile ({pd(e.q95)}; about{' '}
          {(0.05 * seg.T).toFixed(1)} expected) and {e.above99} above the 99% quantile ({pd(e.q99)}; about {(0.01 * seg.T).toFixed(1)}{' '}
          expected). The quantiles are fitted on these same years, so this is an in-sample check, not a backtest.
        </p>
        <p data-testid="band-top-sentence">
          The shaded 99% band holds the central 99% of the fitted distribution: its top ({pd(d.bands.q995)}) is the 99.5% quantile, above
          the 99% quantile ({pd(e.q99)}) that the exceedances count.
        </p>
        <p className="text-xs text-[var(--color-muted)]">
          Shaded: the central 50%, 95% and 99% of the fitted default-rate distribution of an infinitely large pool; small cohorts scatter
          more than the bands.
        </p>
      </div>
    </div>
  );
}
