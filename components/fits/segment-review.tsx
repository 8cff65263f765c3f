import { PairExplorer } from '@/components/pairs/pair-explorer';
import { fixed, interval, pct } from '@/lib/fits/format';
import { ESTIMATOR_NAMES, ESTIMATOR_ORDER, type SegmentResult } from '@/lib/fits/results';
import { BandsChart } from './bands-chart';
import { FactorChart, ForestChart, ProfileChart } from './svg-charts';

const ASSET_CLASS_NAMES: Record<string, string> = {
  corporate: 'corporate',
  'sme-corporate': 'SME corporate',
  'residential-mortgage': 'residential mortgage',
  'qualifying-revolving': 'qualifying revolving retail',
  'other-retail': 'other retail',
  none: 'no asset class',
};

/** Warnings that are cautions of DESIGN.md get the caution style; others are listed plainly. */
const CAUTION_CODES = new Set(['short-series', 'not-identified-short', 'zero-default-periods', 'boundary', 'autocorrelation', 'flat-profile', 'upper-limit']);

function Section({ title, children, id }: { title: string; children: React.ReactNode; id?: string }) {
  return (
    <section className="panel p-4" aria-labelledby={id}>
      <h3 id={id} className="mb-2">
        {title}
      </h3>
      {children}
    </section>
  );
}

/** The review of one segment of a fit run: every part a validator needs to judge the correlation. */
export function SegmentReview({ seg, index }: { seg: SegmentResult; index: number }) {
  const mle = seg.estimates.binomialMle;
  const chosen = seg.estimates[seg.chosen];
  const rates = seg.panel.defaults.map((d, i) => d / seg.panel.obligors[i]);
  const imp = seg.implications;
  const d = seg.diagnostics;
  const prefix = `seg-${index}`;
  const cautions = seg.warnings.filter((w) => CAUTION_CODES.has(w.code));
  const others = seg.warnings.filter((w) => !CAUTION_CODES.has(w.code));
  const mleAudit = seg.audit?.rows.find((r) => r.estimator === 'binomialMle');
  return (
    <article className="space-y-4" data-testid={`segment-review-${index}`}>
      <header className="panel p-4">
        <h2>{seg.segment}</h2>
        <p className="mt-1">
          {chosen.rho !== null ? (
            <>
              Estimated asset correlation <strong className="num">ρ = {fixed(chosen.rho, 3)}</strong> by {ESTIMATOR_NAMES[seg.chosen].toLowerCase()}
              {seg.chosen === 'binomialMle' && mle.intervals.profile ? (
                <>
                  , {Math.round(mle.intervals.profile.level * 100)}% profile-likelihood interval{' '}
                  <span className="num">{interval(mle.intervals.profile.lower, mle.intervals.profile.upper)}</span>
                </>
              ) : null}
              , fitted with PD <span className="num">{pct(chosen.pd)}</span>
            </>
          ) : (
            <>No estimator gives a correlation for these data.</>
          )}
          . {seg.T} periods, {seg.periods[0]}–{seg.periods[seg.periods.length - 1]}; {ASSET_CLASS_NAMES[seg.assetClass]}.
        </p>
        {cautions.length > 0 ? (
          <ul className="notice-caution mt-3 list-disc space-y-1 pl-8 text-sm" data-testid="cautions">
            {cautions.map((w) => (
              <li key={w.code}>{w.message}</li>
            ))}
          </ul>
        ) : null}
        {others.length > 0 ? (
          <ul className="mt-2 list-disc pl-5 text-sm text-[var(--color-muted)]">
            {others.map((w) => (
              <li key={w.code}>{w.message}</li>
            ))}
          </ul>
        ) : null}
      </header>

      <div className="grid gap-4 xl:grid-cols-2">
        <Section title="Estimates of all five estimators" id={`${prefix}-forest`}>
          <ForestChart seg={seg} supervisory={imp?.supervisory?.rho ?? null} />
          <p className="mt-1 text-xs text-[var(--color-muted)]">
            Thick bar: profile-likelihood interval; thin bar below: bootstrap percentile interval. The moment and
            closed-form estimators have no interval here; their spread at this sample size is in the estimator audit.
          </p>
          <table className="table mt-2 text-sm">
            <thead>
              <tr>
                <th>Estimator</th>
                <th className="text-right">ρ</th>
                <th className="text-right">PD</th>
                <th>Status</th>
              </tr>
            </thead>
            <tbody>
              {ESTIMATOR_ORDER.map((k) => {
                const e = seg.estimates[k];
                return (
                  <tr key={k} className={k === seg.chosen ? 'bg-[var(--color-accent-soft)]' : undefined}>
                    <td>{ESTIMATOR_NAMES[k]}</td>
                    <td className="num text-right">{fixed(e.rho, 4)}</td>
                    <td className="num text-right">{pct(e.pd)}</td>
                    <td className="text-xs">{e.status === 'ok' ? 'ok' : `${e.status}: ${e.reason ?? ''}`}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
          <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-4 text-sm">
            <dt className="text-[var(--color-muted)]">Profile interval</dt>
            <dd className="num">{mle.intervals.profile ? interval(mle.intervals.profile.lower, mle.intervals.profile.upper) : '—'}</dd>
            <dt className="text-[var(--color-muted)]">Wald interval</dt>
            <dd>{mle.intervals.wald ? <span className="num">{interval(mle.intervals.wald.lower, mle.intervals.wald.upper)}</span> : <span className="text-xs">not computed by this engine version{mle.atBoundary ? ' (and not defined at the boundary)' : ''}</span>}</dd>
            <dt className="text-[var(--color-muted)]">Bootstrap interval</dt>
            <dd>
              {mle.intervals.bootstrap ? (
                <span className="num">
                  {interval(mle.intervals.bootstrap.lower, mle.intervals.bootstrap.upper)}, bias {mle.intervals.bootstrap.bias >= 0 ? '+' : ''}
                  {fixed(mle.intervals.bootstrap.bias, 4)} (B = {mle.intervals.bootstrap.replications}, seed {mle.intervals.bootstrap.seed})
                </span>
              ) : (
                <span className="text-xs">not requested</span>
              )}
            </dd>
          </dl>
        </Section>

        <Section title="Default rates against the fitted model" id={`${prefix}-bands`}>
          {d.bands ? (
            <>
              <BandsChart periods={seg.periods} rates={rates} bands={d.bands} />
              <p className="mt-1 text-sm" data-testid="exceedances">
                {d.exceed95} of {seg.T} periods lie above the fitted 95% quantile (about {(0.05 * seg.T).toFixed(1)} expected) and {d.exceed99} above
                the 99% quantile (about {(0.01 * seg.T).toFixed(1)} expected). Shaded: the central 50%, 95% and 99% of the fitted
                default-rate distribution.
              </p>
            </>
          ) : (
            <p className="text-sm text-[var(--color-muted)]">No bands: the model has no positive correlation to draw them with.</p>
          )}
        </Section>

        <Section title="Profile log-likelihood of ρ" id={`${prefix}-profile`}>
          {seg.profile && mle.rho !== null ? (
            <>
              <ProfileChart profile={seg.profile} estimate={mle.rho} interval={mle.intervals.profile} />
              {d.lrTestRhoZero ? (
                <p className="mt-1 text-sm">
                  Likelihood-ratio test of ρ = 0: statistic <span className="num">{d.lrTestRhoZero.statistic.toFixed(2)}</span>, p-value{' '}
                  <span className="num">{d.lrTestRhoZero.pValue < 1e-12 ? 'below 10⁻¹²' : d.lrTestRhoZero.pValue < 1e-4 ? d.lrTestRhoZero.pValue.toExponential(1) : d.lrTestRhoZero.pValue.toFixed(4)}</span>{' '}
                  (null distribution: an even mixture of χ²₀ and χ²₁).{' '}
                  {d.lrTestRhoZero.pValue < 0.05 ? 'The data reject zero correlation.' : 'The data do not reject zero correlation.'}
                </p>
              ) : null}
            </>
          ) : (
            <p className="text-sm text-[var(--color-muted)]">No profile: the likelihood estimate is undefined for these data.</p>
          )}
        </Section>

        <Section title="Implied factor, its autocorrelation, PIT values" id={`${prefix}-factor`}>
          {d.impliedFactor ? (
            <>
              <FactorChart periods={seg.periods} factor={d.impliedFactor} pit={d.pit} />
              <p className="mt-1 text-sm">
                Lag-1 autocorrelation of the implied factor:{' '}
                <span className="num">{d.lag1Autocorrelation === null ? 'not computed (a period has a 0% default rate)' : fixed(d.lag1Autocorrelation, 2)}</span>.
                The model assumes independent years; a value above about 0.3 means the intervals are too narrow.
                {d.pit ? ` PIT values should spread evenly over 0–1; here ${d.pit.filter((u) => u < 0.1 || u > 0.9).length} of ${seg.T} lie in the outer 10% on either side (about ${(0.2 * seg.T).toFixed(1)} expected).` : ''}
              </p>
            </>
          ) : (
            <p className="text-sm text-[var(--color-muted)]">No implied factor: the fitted correlation is 0 or undefined.</p>
          )}
        </Section>
      </div>

      <Section title="Estimator audit at this sample size" id={`${prefix}-audit`}>
        {seg.audit ? (
          <>
            <p className="mb-2 text-sm">
              {seg.audit.replications} panels simulated with this segment&apos;s own cohort sizes and {seg.T} periods at the fitted
              values (ρ = {fixed(seg.audit.truth.rho, 3)}, PD {pct(seg.audit.truth.pd)}; seed {seg.audit.seed}).{' '}
              {mleAudit && mleAudit.bias !== null && mleAudit.rmse !== null ? (
                <>
                  The likelihood estimate misses the true value by {fixed(mleAudit.rmse, 3)} on average (RMSE) and is biased by{' '}
                  {mleAudit.bias >= 0 ? '+' : ''}
                  {fixed(mleAudit.bias, 3)}
                  {mleAudit.profileCoverage !== null
                    ? `; its ${Math.round((mle.intervals.profile?.level ?? 0.95) * 100)}% profile interval covered the truth in ${pct(mleAudit.profileCoverage, 3)} of the panels`
                    : ''}
                  . {Math.abs(mleAudit.bias) > 0.25 * seg.audit.truth.rho ? 'The bias is large relative to the estimate: consider a margin of conservatism.' : ''}
                </>
              ) : null}
            </p>
            <table className="table text-sm" data-testid="audit-table">
              <thead>
                <tr>
                  <th>Estimator</th>
                  <th className="text-right">Defined in</th>
                  <th className="text-right">Bias</th>
                  <th className="text-right">RMSE</th>
                  <th className="text-right">Profile coverage</th>
                </tr>
              </thead>
              <tbody>
                {seg.audit.rows.map((r) => (
                  <tr key={r.estimator}>
                    <td>{ESTIMATOR_NAMES[r.estimator]}</td>
                    <td className="num text-right">
                      {r.defined} / {seg.audit!.replications}
                    </td>
                    <td className="num text-right">{r.bias === null ? '—' : `${r.bias >= 0 ? '+' : ''}${fixed(r.bias, 4)}`}</td>
                    <td className="num text-right">{fixed(r.rmse, 4)}</td>
                    <td className="num text-right">{r.profileCoverage === null ? '—' : pct(r.profileCoverage, 3)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
            <p className="mt-1 text-xs text-[var(--color-muted)]">
              With {seg.audit.replications} replications a coverage share is itself uncertain by about ±
              {pct(2 * Math.sqrt(0.95 * 0.05 / seg.audit.replications), 2)} (two standard errors).
            </p>
          </>
        ) : (
          <p className="text-sm text-[var(--color-muted)]">Not run for this fit. Start a fit with the estimator audit to see bias, RMSE and coverage at this sample size.</p>
        )}
      </Section>

      <Section title="What the estimate means" id={`${prefix}-means`}>
        {imp ? (
          <div className="space-y-4">
            <table className="table text-sm" data-testid="implications">
              <tbody>
                <tr>
                  <td>99.9% quantile of the yearly default rate (PD {pct(imp.pd)}, ρ {fixed(imp.rho, 3)})</td>
                  <td className="num text-right">{pct(imp.quantile999)}</td>
                </tr>
                <tr>
                  <td>
                    IRB capital K at the estimate (LGD {pct(imp.lgd, 2)}
                    {imp.maturityYears !== null ? `, maturity ${imp.maturityYears} years` : ', no maturity adjustment (retail)'})
                  </td>
                  <td className="num text-right">{pct(imp.capital.atEstimate)}</td>
                </tr>
                <tr>
                  <td>K at the interval ends</td>
                  <td className="num text-right">
                    {pct(imp.capital.atLower)} – {pct(imp.capital.atUpper)}
                  </td>
                </tr>
                <tr>
                  <td>
                    Supervisory correlation for {ASSET_CLASS_NAMES[seg.assetClass]}
                    {imp.supervisory ? ' and K with it' : ''}
                  </td>
                  <td className="num text-right">
                    {imp.supervisory ? `ρ ${fixed(imp.supervisory.rho, 3)} · K ${pct(imp.supervisory.capital)}` : 'no asset class set for this segment'}
                  </td>
                </tr>
                <tr>
                  <td>Two obligors at the fitted PD: joint default probability (independent: {pct(imp.pair.independent)})</td>
                  <td className="num text-right">{pct(imp.pair.joint)}</td>
                </tr>
                <tr>
                  <td>Their default correlation</td>
                  <td className="num text-right">{fixed(imp.pair.defaultCorrelation, 4)}</td>
                </tr>
              </tbody>
            </table>
            <p className="text-xs text-[var(--color-muted)]">
              K per unit of exposure by the IRB formula (BCBS 2006, para 272; risk weight = 12.5 K without the 1.06 scaling).
              Supervisory correlations are policy settings, not estimates. A correlation is valid only with the PD and the
              definition of default it was fitted on.
            </p>
            <details>
              <summary className="cursor-pointer text-sm text-[var(--color-accent)]">Explore two obligors at this estimate</summary>
              <div className="mt-3">
                <PairExplorer initialPdA={imp.pd} initialPdB={imp.pd} initialRho={imp.rho} heading="Two obligors at the fitted PD" />
              </div>
            </details>
          </div>
        ) : (
          <p className="text-sm text-[var(--color-muted)]">Nothing to show: there is no positive correlation estimate.</p>
        )}
      </Section>

      <Section title="Window comparison" id={`${prefix}-windows`}>
        <table className="table text-sm" data-testid="windows-table">
          <thead>
            <tr>
              <th>Window</th>
              <th className="text-right">T</th>
              <th className="text-right">ρ (likelihood)</th>
              <th className="text-right">Profile interval</th>
              <th className="text-right">PD</th>
              <th className="text-right">ρ (corrected moments)</th>
              <th className="text-right">ρ (joint default)</th>
            </tr>
          </thead>
          <tbody>
            {seg.windows.map((w) => (
              <tr key={w.label}>
                <td>
                  {w.label}{' '}
                  <span className="text-xs text-[var(--color-muted)]">
                    {w.periods[0]}–{w.periods[w.periods.length - 1]}
                  </span>
                </td>
                <td className="num text-right">{w.T}</td>
                <td className="num text-right">{fixed(w.binomialMle.rho, 3)}</td>
                <td className="num text-right">{interval(w.binomialMle.lower, w.binomialMle.upper)}</td>
                <td className="num text-right">{pct(w.binomialMle.pd)}</td>
                <td className="num text-right">{fixed(w.momentVarianceCorrected, 3)}</td>
                <td className="num text-right">{fixed(w.jointDefault, 3)}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="mt-1 text-xs text-[var(--color-muted)]">
          Shorter windows give wider intervals; a large move when one year is left out means the estimate rests on that year.
        </p>
      </Section>
    </article>
  );
}
