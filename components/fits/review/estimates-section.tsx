import { ScrollBox } from '@/components/layout/scroll-box';
import { interval, level, pd, rho, signed } from '@/lib/format';
import { ESTIMATOR_ORDER } from '@/lib/fits/results';
import { estimatorLabel } from '@/lib/stats/estimators/types';
import { ForestChart } from '../svg-charts';
import type { ReviewContext } from './types';

/** The interval an estimator carries in the table (binomialMle's three are in their own table), with its method, or why it has none. */
function ownInterval(e: { intervals?: Record<string, { lower: number; upper: number } | null | undefined>; intervalNotes?: Record<string, string | undefined> }) {
  const ivs = e.intervals ?? {};
  for (const [k, name] of [
    ['chiSquare', 'chi-square'],
    ['profile', 'profile'],
    ['bootstrap', 'bootstrap'],
  ] as const) {
    const iv = ivs[k];
    if (iv) {
      return (
        <>
          {interval(iv.lower, iv.upper)}
          <span className="block font-sans text-xs text-[var(--color-muted)]">{name}</span>
        </>
      );
    }
  }
  const note = Object.values(e.intervalNotes ?? {}).find(Boolean);
  return note ? <span className="font-sans text-xs text-[var(--color-muted)]" title={note}>none: {note}</span> : '—';
}

/** Every estimator's value, interval and status, and the three intervals of the likelihood estimate. */
export function EstimatesSection({ seg, bootstrapRequested }: ReviewContext) {
  const mle = seg.estimates.binomialMle;
  const iv = mle.intervals;
  const lv = level(seg.level);
  const hasMle = mle.rho !== null && mle.logLik !== null && mle.status !== 'not-converged';
  return (
    <div className="space-y-4">
      <div className="max-w-3xl">
        <ForestChart seg={seg} supervisory={seg.implications?.supervisory?.rho ?? null} />
        <p className="mt-1 text-xs text-[var(--color-muted)]">
          Intervals at {lv}. The likelihood estimate: profile likelihood, Wald (built on the logit scale of ρ), and the parametric
          bootstrap when it was run. The closed form: the chi-square interval of its large-pool approximation. The moment estimators: a
          parametric bootstrap at each one&apos;s own estimate, when it was run. The persistent-factor model: its profile interval.
        </p>
      </div>
      <div className="grid gap-4 xl:grid-cols-2">
        <ScrollBox label="Estimates of every estimator">
          <table className="table text-sm" data-testid="estimates-table">
            <thead>
              <tr>
                <th>Estimator</th>
                <th className="text-right">ρ</th>
                <th className="text-right">PD</th>
                <th className="text-right">Interval</th>
                <th>Status</th>
              </tr>
            </thead>
            <tbody>
              {ESTIMATOR_ORDER.map((k) => {
                const e = seg.estimates[k];
                if (!e) return null;
                return (
                  <tr key={k} className={k === seg.chosen ? 'bg-[var(--color-accent-soft)]' : undefined}>
                    <td>{estimatorLabel(k)}</td>
                    <td className="num text-right">{rho(e.rho)}</td>
                    <td className="num text-right">{pd(e.pd)}</td>
                    <td className="num text-right whitespace-nowrap">{ownInterval(e)}</td>
                    <td className="text-xs">{e.status === 'ok' ? 'ok' : `${e.status}${e.reason ? `: ${e.reason}` : ''}`}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </ScrollBox>
        <ScrollBox label="Intervals of the likelihood estimate">
          <table className="table text-sm" data-testid="intervals-table">
            <caption className="mb-1 text-left text-sm text-[var(--color-muted)]">
              {lv} intervals of the likelihood estimate
              {mle.logLik !== null ? (
                <>
                  {' '}
                  (log-likelihood at the estimate <span className="num">{mle.logLik.toFixed(3)}</span>, binomial coefficients included)
                </>
              ) : null}
            </caption>
            <thead>
              <tr>
                <th>Method</th>
                <th className="text-right">Interval</th>
                <th>Note</th>
              </tr>
            </thead>
            <tbody>
              <tr>
                <td>Profile likelihood</td>
                <td className="num text-right whitespace-nowrap">{iv.profile ? interval(iv.profile.lower, iv.profile.upper) : '—'}</td>
                <td className="text-xs">
                  {iv.profile
                    ? iv.profile.upperAtSearchLimit
                      ? 'The upper end is the search limit: the data do not bound ρ from above.'
                      : iv.profile.lower === 0
                        ? 'The lower end is 0: the data do not exclude independence.'
                        : 'p re-maximised at each ρ.'
                    : 'No likelihood estimate.'}
                </td>
              </tr>
              <tr>
                <td>Wald</td>
                <td className="num text-right whitespace-nowrap">{iv.wald ? interval(iv.wald.lower, iv.wald.upper) : '—'}</td>
                <td className="text-xs">
                  {iv.wald ? (
                    <>
                      standard error of ρ <span className="num">{rho(iv.wald.se)}</span>
                    </>
                  ) : mle.atBoundary ? (
                    'Not defined at ρ = 0 (the boundary); read the profile interval.'
                  ) : hasMle ? (
                    'Not available: the observed information is not positive definite.'
                  ) : (
                    'No likelihood estimate.'
                  )}
                </td>
              </tr>
              <tr>
                <td>Parametric bootstrap</td>
                <td className="num text-right whitespace-nowrap">{iv.bootstrap ? interval(iv.bootstrap.lower, iv.bootstrap.upper) : '—'}</td>
                <td className="text-xs">
                  {iv.bootstrap ? (
                    <>
                      bias <span className="num">{signed(iv.bootstrap.bias)}</span>, B = {iv.bootstrap.replications}, seed {iv.bootstrap.seed}
                      {iv.bootstrap.failed > 0 ? `, ${iv.bootstrap.failed} replications without an estimate` : ''}
                    </>
                  ) : bootstrapRequested ? (
                    'Asked for but not possible for these data (see the notes above).'
                  ) : (
                    'Not requested for this fit.'
                  )}
                </td>
              </tr>
            </tbody>
          </table>
        </ScrollBox>
      </div>
    </div>
  );
}
