import { ScrollBox } from '@/components/layout/scroll-box';
import { fixed, interval, level, pd, pValue, rho } from '@/lib/format';
import { estimatorLabel } from '@/lib/stats/estimators/types';
import { PhiProfileChart } from '../time-charts';
import type { ReviewContext } from './types';

/** Width of an interval, or a dash. */
function width(iv: { lower: number; upper: number } | null | undefined): string {
  return iv ? rho(iv.upper - iv.lower) : '—';
}

/**
 * The independent-factor model beside the persistent-factor (AR(1)) one: each model's likelihood
 * estimate with its profile interval, phi with its interval and profile, the likelihood-ratio test
 * of independent years, and the variance moments with and without the autocorrelation correction.
 */
export function ModelsSection({ seg }: ReviewContext) {
  const ind = seg.estimates.binomialMle;
  const ar1 = seg.estimates.ar1Mle;
  if (!ar1) return <p className="text-sm text-[var(--color-muted)]">The AR(1) model was not run for this fit.</p>;
  const lv = level(seg.level);
  const lr = ar1.lrTestPhi0;
  const persistent = lr !== null && lr.pValue < 0.05 && ar1.phi !== null && ar1.phi > 0;
  const alternating = lr !== null && lr.pValue < 0.05 && ar1.phi !== null && ar1.phi < 0;
  const plain = seg.estimates.momentVariance;
  const auto = seg.estimates.momentVarianceAutocorrected;
  return (
    <div className="space-y-4">
      <p className="text-sm">
        The independent model draws the year&apos;s systematic factor afresh every year; the AR(1) model lets it persist,
        Z<sub>t</sub> = φ Z<sub>t−1</sub> + √(1 − φ²) e<sub>t</sub>, so that good and bad years come in runs as credit cycles do. With
        φ &gt; 0 the years carry less independent information than their number suggests, and intervals that assume independence are too
        narrow.
      </p>
      {persistent ? (
        <p className="notice-caution text-sm" data-testid="persistence-caution">
          The data show a persistent factor (φ = {fixed(ar1.phi, 2)}, test of independent years p = {pValue(lr.pValue)}): the independent
          model&apos;s intervals are too narrow here. Read the AR(1) model&apos;s interval of ρ, {interval(ar1.intervals.profile?.lower, ar1.intervals.profile?.upper)},
          beside the independent one.
        </p>
      ) : null}
      {alternating ? (
        <p className="notice-caution text-sm" data-testid="persistence-caution">
          The factor alternates from year to year (φ = {fixed(ar1.phi, 2)}, p = {pValue(lr.pValue)}): the years are not independent as the
          standard model assumes. Read both intervals of ρ.
        </p>
      ) : null}
      <div className="space-y-3">
        <ScrollBox label="The two models side by side">
          <table className="table text-sm" data-testid="models-table">
            <thead>
              <tr>
                <th>Model</th>
                <th className="text-right">ρ</th>
                <th className="text-right">PD</th>
                <th className="text-right">φ</th>
                <th className="text-right">{lv} interval of ρ</th>
                <th className="text-right">Width</th>
                <th className="text-right">Log-likelihood</th>
              </tr>
            </thead>
            <tbody>
              <tr>
                <td>
                  Independent years
                  <span className="block text-xs text-[var(--color-muted)]">{estimatorLabel('binomialMle')}</span>
                </td>
                <td className="num text-right">{rho(ind.rho)}</td>
                <td className="num text-right">{pd(ind.pd)}</td>
                <td className="num text-right">0 (assumed)</td>
                <td className="num text-right whitespace-nowrap">{interval(ind.intervals.profile?.lower, ind.intervals.profile?.upper)}</td>
                <td className="num text-right">{width(ind.intervals.profile)}</td>
                <td className="num text-right">{fixed(ind.logLik, 3)}</td>
              </tr>
              <tr>
                <td>
                  Persistent factor, AR(1)
                  <span className="block text-xs text-[var(--color-muted)]">{estimatorLabel('ar1Mle')}</span>
                </td>
                <td className="num text-right">{rho(ar1.rho)}</td>
                <td className="num text-right">{pd(ar1.pd)}</td>
                <td className="num text-right whitespace-nowrap">
                  {ar1.phi === null ? '—' : fixed(ar1.phi, 3)}
                  {ar1.phiInterval && ar1.phi !== null ? (
                    <span className="block text-xs text-[var(--color-muted)]">
                      [{fixed(ar1.phiInterval.lower, 2)}, {fixed(ar1.phiInterval.upper, 2)}]
                    </span>
                  ) : null}
                </td>
                <td className="num text-right whitespace-nowrap">{interval(ar1.intervals.profile?.lower, ar1.intervals.profile?.upper)}</td>
                <td className="num text-right">{width(ar1.intervals.profile)}</td>
                <td className="num text-right">{fixed(ar1.logLik, 3)}</td>
              </tr>
            </tbody>
          </table>
        </ScrollBox>
        <div className="space-y-2 text-sm">
          {ar1.rho === null || ar1.status !== 'ok' ? (
            <p data-testid="ar1-status">
              AR(1) model: {ar1.status}
              {ar1.reason ? `: ${ar1.reason}` : ''}
            </p>
          ) : null}
          {ar1.intervalNotes?.profile ? <p>{ar1.intervalNotes.profile}</p> : null}
          <p data-testid="lr-test-phi">
            {lr ? (
              <>
                Likelihood-ratio test of independent years (φ = 0): statistic <span className="num">{fixed(lr.statistic, 2)}</span>, p-value{' '}
                <span className="num">{pValue(lr.pValue)}</span> (χ²₁).{' '}
                {lr.pValue < 0.05 ? 'The data reject independent years at 5%.' : 'The data do not reject independent years at 5%; with 10–25 years the test has little power, so this is no proof of independence.'}
              </>
            ) : (
              seg.diagnostics.lrTestPhi0Note ?? 'The test of independent years could not run.'
            )}
          </p>
          {auto && plain ? (
            <p data-testid="autocorrected-moments">
              Variance moments: {rho(plain.rho)} as they stand, {rho(auto.rho)} corrected for the autocorrelation of the default rates
              {auto.correction ? (
                <>
                  {' '}
                  (lag-1 autocorrelation {fixed(auto.correction.lag1, 2)}
                  {auto.correction.lag1Used !== auto.correction.lag1 ? `, used as ${fixed(auto.correction.lag1Used, 2)}` : ''}; the sample
                  variance divided by {fixed(auto.correction.factor, 3)}, its mean under an AR(1) with that coefficient)
                </>
              ) : null}
              .
            </p>
          ) : null}
        </div>
      </div>
      {ar1.phiProfile && ar1.phiProfile.points.length > 1 ? (
        <div className="max-w-2xl">
          <PhiProfileChart points={ar1.phiProfile.points} cutoff={ar1.phiProfile.cutoff} estimate={ar1.phi} interval={ar1.phi === null ? null : ar1.phiInterval} />
          <p className="mt-1 text-xs text-[var(--color-muted)]">
            Dashed red line: the cut-off, the maximum less χ²₁({seg.level})/2; shaded: the {lv} interval of φ.
            {ar1.phi === null ? ' At ρ = 0 the factor has no weight, so φ is not identified and the profile is flat.' : ''}
          </p>
        </div>
      ) : null}
    </div>
  );
}
