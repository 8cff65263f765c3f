import { pValue } from '@/lib/format';
import { ProfileChart } from '../svg-charts';
import type { ReviewContext } from './types';

/** The profile log-likelihood of rho with its cut-off, and the likelihood-ratio test of rho = 0. */
export function ProfileSection({ seg }: ReviewContext) {
  const mle = seg.estimates.binomialMle;
  const d = seg.diagnostics;
  const hasMle = mle.rho !== null && mle.logLik !== null && mle.status !== 'not-converged';
  if (!(hasMle && seg.profileCurve.length > 1 && seg.profileCutoff !== null)) {
    return <p className="text-sm text-[var(--color-muted)]">No profile: the likelihood estimate is not available for these data.</p>;
  }
  const levelPct = `${Math.round(seg.level * 1000) / 10}%`;
  return (
    <div className="grid gap-4 xl:grid-cols-[3fr_2fr]">
      <ProfileChart curve={seg.profileCurve} cutoff={seg.profileCutoff} estimate={mle.rho!} logLik={mle.logLik!} interval={mle.intervals.profile} />
      <div className="space-y-2">
        <p className="text-xs text-[var(--color-muted)]">
          Dashed red line: the cut-off {seg.profileCutoff.toFixed(2)}, the maximum less χ²₁({seg.level})/2; the {levelPct} profile interval
          holds every ρ whose curve stays above it. Shaded: the profile interval.
        </p>
        {d.lrTestRhoZero ? (
          <p className="text-sm" data-testid="lr-test">
            Likelihood-ratio test of ρ = 0: statistic <span className="num">{d.lrTestRhoZero.statistic.toFixed(2)}</span>, p-value{' '}
            <span className="num">{pValue(d.lrTestRhoZero.pValue)}</span> (null distribution: an even mixture of χ²₀ and χ²₁).{' '}
            {d.lrTestRhoZero.pValue < 0.05 ? 'The data reject zero correlation at 5%.' : 'The data do not reject zero correlation at 5%.'}
          </p>
        ) : null}
      </div>
    </div>
  );
}
