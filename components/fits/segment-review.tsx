import { PairExplorer } from '@/components/pairs/pair-explorer';
import { assetClassNames } from '@/lib/asset-classes';
import { fixed, interval, pct } from '@/lib/fits/format';
import { ESTIMATOR_NAMES, ESTIMATOR_ORDER, type FitSegmentResult } from '@/lib/fits/results';
import { WARNING_CODES } from '@/lib/stats/fit-warnings';
import { BandsChart } from './bands-chart';
import { FactorChart, ProfileChart, ForestChart } from './svg-charts';

/** Warnings that are cautions of DESIGN.md (short series, zero-default years, boundary, autocorrelation,
 * identification): every engine warning except the two that only say an optional part was not run. */
const CAUTION_CODES: ReadonlySet<string> = new Set(
  WARNING_CODES.filter((c) => c !== 'bootstrap-unavailable' && c !== 'audit-unavailable'),
);

function Section({ title, children, id }: { title: string; children: React.ReactNode; id: string }) {
  return (
    <section className="panel p-4" aria-labelledby={id}>
      <h3 id={id} className="mb-2">
        {title}
      </h3>
      {children}
    </section>
  );
}

function signed(x: number | null, digits = 4): string {
  if (x === null) return '—';
  return `${x >= 0 ? '+' : '−'}${fixed(Math.abs(x), digits)}`;
}

function pValue(p: number): string {
  if (p < 1e-12) return 'below 10⁻¹²';
  if (p < 1e-4) return p.toExponential(1);
  return p.toFixed(4);
}

/** The serial-dependence test on the PIT values (runs with zero-default years), or why it could not run. */
function SerialTest({ d }: { d: FitSegmentResult['diagnostics'] }) {
  // Results stored before the granular PIT have neither field.
  if (d.pitSerialTest === undefined && d.pitSerialNote === undefined) return null;
  return (
    <p className="mt-1 text-sm" data-testid="pit-serial">
      Serial dependence of the PIT values (every year, zero-default years included):{' '}
      {d.pitSerialTest ? (
        <>
          lag-1 autocorrelation of their normal scores <span className="num">{fixed(d.pitSerialTest.statistic, 2)}</span> against ±
          {fixed(d.pitSerialTest.threshold, 2)}.{' '}
          {d.pitSerialTest.material ? 'Material: consecutive years move together, so the intervals are too narrow.' : 'Within that band.'}
        </>
      ) : (
        <span>{d.pitSerialNote}</span>
      )}{' '}
      {d.pitMethod ? <span className="text-xs text-[var(--color-muted)]">PIT: {d.pitMethod}.</span> : null}
    </p>
  );
}

/**
 * The review of one segment of a fit run: every part a validator needs to judge the correlation,
 * drawn from the engine's SegmentFit (lib/stats/fit-panel.ts) and the run's audit and windows.
 */
export function SegmentReview({ seg, index, bootstrapRequested }: { seg: FitSegmentResult; index: number; bootstrapRequested: boolean }) {
  const mle = seg.estimates.binomialMle;
  const iv = mle.intervals;
  const chosen = seg.estimates[seg.chosen];
  const rates = seg.observed.map((o) => o.dr);
  const imp = seg.implications;
  const d = seg.diagnostics;
  const prefix = `seg-${index}`;
  const levelPct = `${Math.round(seg.level * 1000) / 10}%`;
  const cautions = seg.warnings.filter((w) => CAUTION_CODES.has(w.code));
  const others = seg.warnings.filter((w) => !CAUTION_CODES.has(w.code));
  const audit = seg.estimatorAudit;
  const mleAudit = audit?.estimators.binomialMle;
  const hasMle = mle.rho !== null && mle.logLik !== null && mle.status !== 'not-converged';
  return (
    <article className="space-y-4" data-testid={`segment-review-${index}`}>
      <header className="panel p-4">
        <h2>{seg.segment}</h2>
        <p className="mt-1">
          {chosen.rho !== null ? (
            <>
              Estimated asset correlation <strong className="num">ρ = {fixed(chosen.rho, 3)}</strong> by {ESTIMATOR_NAMES[seg.chosen].toLowerCase()}
              {seg.chosen === 'binomialMle' && iv.profile ? (
                <>
                  , {levelPct} profile-likelihood interval <span className="num">{interval(iv.profile.lower, iv.profile.upper)}</span>
                </>
              ) : null}
              , fitted with PD <span className="num">{pct(chosen.pd)}</span>
            </>
          ) : (
            <>No estimator gives a correlation for these data</>
          )}
          . {seg.T} periods, {seg.periods[0]}–{seg.periods[seg.periods.length - 1]}; {assetClassNames[seg.assetClass]}.
        </p>
        {cautions.length > 0 ? (
          <ul className="notice-caution mt-3 list-disc space-y-1 pl-8 text-sm" data-testid="cautions" aria-label="Cautions">
            {cautions.map((w) => (
              <li key={w.code}>{w.message}</li>
            ))}
          </ul>
        ) : null}
        {others.length > 0 ? (
          <ul className="mt-2 list-disc pl-5 text-sm text-[var(--color-muted)]" aria-label="Notes">
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
            Intervals at {levelPct} for the likelihood estimate: profile likelihood, Wald (built on the logit scale of ρ), and the
            parametric bootstrap when it was run. The moment and closed-form estimators have no interval; their spread at this sample
            size is what the estimator audit shows.
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
                    <td className="text-xs">{e.status === 'ok' ? 'ok' : `${e.status}${e.reason ? `: ${e.reason}` : ''}`}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
          <table className="table mt-3 text-sm" data-testid="intervals-table">
            <caption className="mb-1 text-left text-sm text-[var(--color-muted)]">
              {levelPct} intervals of the likelihood estimate
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
                <td className="num text-right">{iv.profile ? interval(iv.profile.lower, iv.profile.upper) : '—'}</td>
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
                <td className="num text-right">{iv.wald ? interval(iv.wald.lower, iv.wald.upper) : '—'}</td>
                <td className="text-xs">
                  {iv.wald ? (
                    <>
                      standard error of ρ <span className="num">{fixed(iv.wald.se, 4)}</span>
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
                <td className="num text-right">{iv.bootstrap ? interval(iv.bootstrap.lower, iv.bootstrap.upper) : '—'}</td>
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
        </Section>

        <Section title="Default rates against the fitted model" id={`${prefix}-bands`}>
          {d.bands && d.exceedances ? (
            <>
              <BandsChart periods={seg.periods} rates={rates} bands={d.bands} q95={d.exceedances.q95} q99={d.exceedances.q99} />
              <p className="mt-1 text-sm" data-testid="exceedances">
                {d.exceedances.above95} of {seg.T} periods lie above the fitted 95% quantile ({pct(d.exceedances.q95)}; about{' '}
                {(0.05 * seg.T).toFixed(1)} expected) and {d.exceedances.above99} above the 99% quantile ({pct(d.exceedances.q99)}; about{' '}
                {(0.01 * seg.T).toFixed(1)} expected). Shaded: the central 50%, 95% and 99% of the fitted default-rate distribution of an
                infinitely large pool; small cohorts scatter more than the bands.
              </p>
            </>
          ) : (
            <p className="text-sm text-[var(--color-muted)]">{d.fittedNote ?? 'No fitted distribution to draw.'}</p>
          )}
        </Section>

        <Section title="Profile log-likelihood of ρ" id={`${prefix}-profile`}>
          {hasMle && seg.profileCurve.length > 1 && seg.profileCutoff !== null ? (
            <>
              <ProfileChart curve={seg.profileCurve} cutoff={seg.profileCutoff} estimate={mle.rho!} logLik={mle.logLik!} interval={iv.profile} />
              <p className="mt-1 text-xs text-[var(--color-muted)]">
                Dashed red line: the cut-off {seg.profileCutoff.toFixed(2)}, the maximum less χ²₁({seg.level})/2; the {levelPct} profile interval holds every ρ whose curve stays above it. Shaded:
                the profile interval.
              </p>
              {d.lrTestRhoZero ? (
                <p className="mt-1 text-sm" data-testid="lr-test">
                  Likelihood-ratio test of ρ = 0: statistic <span className="num">{d.lrTestRhoZero.statistic.toFixed(2)}</span>, p-value{' '}
                  <span className="num">{pValue(d.lrTestRhoZero.pValue)}</span> (null distribution: an even mixture of χ²₀ and χ²₁).{' '}
                  {d.lrTestRhoZero.pValue < 0.05 ? 'The data reject zero correlation at 5%.' : 'The data do not reject zero correlation at 5%.'}
                </p>
              ) : null}
            </>
          ) : (
            <p className="text-sm text-[var(--color-muted)]">No profile: the likelihood estimate is not available for these data.</p>
          )}
        </Section>

        <Section title="Implied factor, its autocorrelation, PIT values" id={`${prefix}-factor`}>
          {d.impliedFactor ? (
            <>
              <FactorChart periods={seg.periods} factor={d.impliedFactor} pit={d.pit} />
              <p className="mt-1 text-sm" data-testid="autocorrelation">
                Lag-1 autocorrelation of the implied factor:{' '}
                {d.lag1Autocorrelation === null ? (
                  <span>{d.autocorrelationNote ?? 'not computed (a period with a 0% or 100% default rate has no finite factor, or fewer than 5 periods)'}</span>
                ) : (
                  <>
                    <span className="num">{fixed(d.lag1Autocorrelation, 2)}</span>, against ±{fixed(d.autocorrelationThreshold, 2)} for
                    independent years (1.96/√T).{' '}
                    {Math.abs(d.lag1Autocorrelation) > d.autocorrelationThreshold
                      ? 'Material: the intervals are too narrow.'
                      : 'Within that band.'}
                  </>
                )}
                {d.pit
                  ? ` PIT values should spread evenly over 0–1; here ${d.pit.filter((u) => u < 0.1 || u > 0.9).length} of ${seg.T} lie in the outer tenths (about ${(0.2 * seg.T).toFixed(1)} expected).`
                  : ''}
              </p>
              <SerialTest d={d} />
            </>
          ) : (
            <>
              <p className="text-sm text-[var(--color-muted)]">{d.fittedNote ?? 'No implied factor.'}</p>
              <SerialTest d={d} />
            </>
          )}
          <p className="mt-1 text-xs text-[var(--color-muted)]">
            {d.zeroDefaultPeriods} period{d.zeroDefaultPeriods === 1 ? '' : 's'} without a default, {d.allDefaultPeriods} with every obligor
            in default.
          </p>
        </Section>
      </div>

      <Section title="Estimator audit at this sample size" id={`${prefix}-audit`}>
        {audit ? (
          <>
            <p className="mb-2 text-sm">
              {audit.replications} panels simulated with this segment&apos;s own cohort sizes and {audit.periods} periods at the fitted values
              (ρ = {fixed(audit.truth.rho, 3)}, PD {pct(audit.truth.pd)}; seed {audit.seed}), every estimator run on each.{' '}
              {mleAudit && mleAudit.bias !== null && mleAudit.rmse !== null ? (
                <>
                  The likelihood estimate misses the value it was simulated from by {fixed(mleAudit.rmse, 3)} (RMSE), with a bias of{' '}
                  {signed(mleAudit.bias, 3)}
                  {audit.coverage.profile.coverage !== null
                    ? `; its ${levelPct} profile interval covered it in ${pct(audit.coverage.profile.coverage, 3)} of the panels`
                    : ''}
                  .{' '}
                  {Math.abs(mleAudit.bias) > 0.25 * audit.truth.rho
                    ? 'The bias is large against the estimate: a margin of conservatism is worth considering.'
                    : ''}
                  {audit.coverage.profile.coverage !== null && audit.coverage.profile.mcse !== null && audit.coverage.profile.coverage + 2 * audit.coverage.profile.mcse < seg.level
                    ? ` The profile interval covers less often than its ${levelPct}: read it as too narrow at this sample size.`
                    : ''}
                </>
              ) : null}
            </p>
            <table className="table text-sm" data-testid="audit-table">
              <thead>
                <tr>
                  <th>Estimator</th>
                  <th className="text-right">Gave a value</th>
                  <th className="text-right">Bias (± MC s.e.)</th>
                  <th className="text-right">Std. dev.</th>
                  <th className="text-right">RMSE</th>
                </tr>
              </thead>
              <tbody>
                {ESTIMATOR_ORDER.map((k) => {
                  const r = audit.estimators[k];
                  return (
                    <tr key={k}>
                      <td>{ESTIMATOR_NAMES[k]}</td>
                      <td className="num text-right">
                        {r.defined} / {audit.replications}
                      </td>
                      <td className="num text-right">
                        {signed(r.bias)}
                        {r.biasMcse !== null ? ` ± ${fixed(r.biasMcse, 4)}` : ''}
                      </td>
                      <td className="num text-right">{fixed(r.sd, 4)}</td>
                      <td className="num text-right">{fixed(r.rmse, 4)}</td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
            <table className="table mt-3 text-sm" data-testid="audit-coverage">
              <thead>
                <tr>
                  <th>Interval of the likelihood estimate</th>
                  <th className="text-right">Available</th>
                  <th className="text-right">Covered the truth (± MC s.e.)</th>
                  <th className="text-right">Mean width</th>
                </tr>
              </thead>
              <tbody>
                {(['profile', 'wald'] as const).map((m) => {
                  const c = audit.coverage[m];
                  return (
                    <tr key={m}>
                      <td>
                        {m === 'profile' ? 'Profile likelihood' : 'Wald (logit scale)'} at {Math.round(c.level * 1000) / 10}%
                      </td>
                      <td className="num text-right">
                        {c.available} / {audit.replications}
                      </td>
                      <td className="num text-right">
                        {c.coverage === null ? '—' : pct(c.coverage, 3)}
                        {c.mcse !== null ? ` ± ${pct(c.mcse, 2)}` : ''}
                      </td>
                      <td className="num text-right">{fixed(c.meanWidth, 3)}</td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
            <p className="mt-1 text-xs text-[var(--color-muted)]">
              The audit simulates at the estimate, not at the unknown true value: it tells how the estimators behave if the estimate were
              right. MC s.e.: the Monte Carlo standard error from {audit.replications} replications.
              {audit.coverage.wald.available < audit.replications ? ' Panels whose estimate fell at ρ = 0 have no Wald interval.' : ''}
              {audit.omitted.map((o) => ` Not audited: ${o.item}. ${o.reason}`).join('')}
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
                    {imp.maturityYears !== null ? `, maturity ${imp.maturityYears} years` : ', no maturity adjustment'})
                  </td>
                  <td className="num text-right">{pct(imp.capital.atEstimate)}</td>
                </tr>
                <tr>
                  <td>K at the ends of the profile interval {iv.profile ? interval(iv.profile.lower, iv.profile.upper) : ''}</td>
                  <td className="num text-right">
                    {pct(imp.capital.atLower)} – {pct(imp.capital.atUpper)}
                  </td>
                </tr>
                <tr>
                  <td>
                    Supervisory correlation for {assetClassNames[seg.assetClass]}
                    {imp.supervisory ? ' and K with it' : ''}
                  </td>
                  <td className="num text-right">
                    {imp.supervisory
                      ? `ρ ${fixed(imp.supervisory.rho, 3)} · K ${pct(imp.supervisory.capital)}`
                      : seg.assetClass === 'none'
                        ? 'no asset class set for this segment'
                        : 'not available (see the notes above)'}
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
              {imp.convention} Supervisory correlations are policy settings, not estimates. A correlation is valid only with the PD and
              the definition of default it was fitted on.
            </p>
            <details>
              <summary className="cursor-pointer text-sm text-[var(--color-accent)]">Explore two obligors at this estimate</summary>
              <div className="mt-3">
                <PairExplorer initialPdA={imp.pd} initialPdB={imp.pd} initialRho={imp.rho} heading="Two obligors at the fitted PD" />
              </div>
            </details>
          </div>
        ) : (
          <p className="text-sm text-[var(--color-muted)]">Nothing to show: there is no likelihood estimate to draw implications from.</p>
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
                  {w.warnings.includes('at-boundary') ? <span className="badge ml-1 text-xs">ρ = 0</span> : null}
                </td>
                <td className="num text-right">{w.T}</td>
                <td className="num text-right">{fixed(w.binomialMle.rho, 3)}</td>
                <td className="num text-right">{interval(w.binomialMle.profile?.lower, w.binomialMle.profile?.upper)}</td>
                <td className="num text-right">{pct(w.binomialMle.pd)}</td>
                <td className="num text-right">{fixed(w.momentVarianceCorrected, 3)}</td>
                <td className="num text-right">{fixed(w.jointDefault, 3)}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="mt-1 text-xs text-[var(--color-muted)]">
          Each window fitted by the same engine at {levelPct}. Shorter windows give wider intervals; a large move when one year is left out
          means the estimate rests on that year.
        </p>
      </Section>

      <details className="panel p-4">
        <summary className="cursor-pointer text-sm text-[var(--color-accent)]">The data of this segment, period by period</summary>
        <table className="table mt-2 text-sm" data-testid="observed-table">
          <thead>
            <tr>
              <th>Period</th>
              <th className="text-right">Obligors</th>
              <th className="text-right">Defaults</th>
              <th className="text-right">Default rate</th>
              <th className="text-right">Implied factor</th>
              <th className="text-right">PIT</th>
            </tr>
          </thead>
          <tbody>
            {seg.observed.map((o, t) => (
              <tr key={o.period}>
                <td>{o.period}</td>
                <td className="num text-right">{o.obligors.toLocaleString('en-GB')}</td>
                <td className="num text-right">{o.defaults.toLocaleString('en-GB')}</td>
                <td className="num text-right">{pct(o.dr)}</td>
                <td className="num text-right">{fixed(d.impliedFactor?.[t] ?? null, 2)}</td>
                <td className="num text-right">{fixed(d.pit?.[t] ?? null, 3)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </details>
    </article>
  );
}
