import { ScrollBox } from '@/components/layout/scroll-box';
import { count, fixed, level, pct, pd, rho, signed } from '@/lib/format';
import type { FitSegmentResult } from '@/lib/fits/results';
import { estimatorLabel, INDEPENDENT_ESTIMATOR_KEYS } from '@/lib/stats/estimators/types';
import type { ReviewContext } from './types';

type Audit = NonNullable<FitSegmentResult['estimatorAudit']>;
type EstimatorRow = Audit['estimators']['binomialMle'];
type CoverageRow = Audit['coverage']['profile'];

/** The study's estimator rows: the five of the independent model, then the persistent-factor ones and phi when studied. */
function auditRows(audit: Audit): [string, string, EstimatorRow][] {
  const rows: [string, string, EstimatorRow][] = INDEPENDENT_ESTIMATOR_KEYS.map((k) => [k, estimatorLabel(k), audit.estimators[k]]);
  const p = audit.persistent;
  if (p) {
    rows.push(['momentVarianceAutocorrected', estimatorLabel('momentVarianceAutocorrected'), p.momentVarianceAutocorrected]);
    rows.push(['ar1Mle', estimatorLabel('ar1Mle'), p.ar1Mle]);
    rows.push(['phi', 'φ of the AR(1) model (bias around the simulated φ)', p.phi]);
  }
  return rows;
}

/** The study's interval rows: binomialMle's two, vasicekMle's chi-square (studied since engine 3.0) and ar1Mle's profile when studied. */
function coverageRows(audit: Audit): [string, string, CoverageRow][] {
  const rows: [string, string, CoverageRow][] = [
    ['profile', 'Profile likelihood', audit.coverage.profile],
    ['wald', 'Wald (logit scale)', audit.coverage.wald],
  ];
  // absent in studies stored before engine 3.0
  const chi = audit.coverage.chiSquare as CoverageRow | undefined;
  if (chi) rows.push(['chiSquare', 'Chi-square (closed form)', chi]);
  if (audit.persistent) rows.push(['ar1Profile', 'AR(1) model, profile likelihood', audit.persistent.ar1Profile]);
  return rows;
}

/**
 * The small-sample simulation study (the engine's estimatorAudit): panels simulated with the
 * segment's own cohort sizes and years at the fitted values, every estimator run on each; bias,
 * RMSE and the coverage of the likelihood estimate's intervals.
 */
export function SimulationSection({ seg }: ReviewContext) {
  const audit = seg.estimatorAudit;
  if (!audit) {
    return (
      <p className="text-sm text-[var(--color-muted)]">
        Not run for this fit. Start a fit with the small-sample simulation study to see bias, RMSE and interval coverage at this sample
        size.
      </p>
    );
  }
  const lv = level(seg.level);
  const mleAudit = audit.estimators.binomialMle;
  const profile = audit.coverage.profile;
  return (
    <div className="space-y-3">
      <p className="text-sm">
        {count(audit.replications, 'panel')} simulated with this segment&apos;s own cohort sizes and {count(audit.periods, 'period')} at the
        fitted values (ρ = {rho(audit.truth.rho)}, PD {pd(audit.truth.pd)}
        {audit.truth.phi !== undefined ? `, a persistent factor with φ = ${fixed(audit.truth.phi, 2)}, the AR(1) model's fit` : ''}; seed {audit.seed}), every
        estimator run on each.{' '}
        {mleAudit && mleAudit.bias !== null && mleAudit.rmse !== null ? (
          <>
            The likelihood estimate misses the value it was simulated from by {rho(mleAudit.rmse)} (RMSE), with a bias of {signed(mleAudit.bias)}
            {profile.coverage !== null ? `; its ${lv} profile interval covered it in ${pct(profile.coverage, 3)} of the panels` : ''}.{' '}
            {Math.abs(mleAudit.bias) > 0.25 * audit.truth.rho ? 'The bias is large against the estimate: a margin of conservatism is worth considering.' : ''}
            {profile.coverage !== null && profile.mcse !== null && profile.coverage + 2 * profile.mcse < seg.level
              ? ` The profile interval covers less often than its ${lv}: read it as too narrow at this sample size.`
              : ''}
          </>
        ) : null}
      </p>
      <div className="grid gap-4 xl:grid-cols-2">
        <ScrollBox label="Bias and RMSE of every estimator">
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
              {auditRows(audit).map(([k, label, r]) => {
                return (
                  <tr key={k}>
                    <td>{label}</td>
                    <td className="num text-right whitespace-nowrap">
                      {r.defined} / {audit.replications}
                    </td>
                    <td className="num text-right whitespace-nowrap">
                      {signed(r.bias)}
                      {r.biasMcse !== null ? ` ± ${rho(r.biasMcse)}` : ''}
                    </td>
                    <td className="num text-right">{rho(r.sd)}</td>
                    <td className="num text-right">{rho(r.rmse)}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </ScrollBox>
        <ScrollBox label="Coverage of the intervals">
          <table className="table text-sm" data-testid="audit-coverage">
            <thead>
              <tr>
                <th>Interval</th>
                <th className="text-right">Available</th>
                <th className="text-right">Covered the truth (± MC s.e.)</th>
                <th className="text-right">Mean width</th>
              </tr>
            </thead>
            <tbody>
              {coverageRows(audit).map(([m, label, c]) => {
                return (
                  <tr key={m}>
                    <td>
                      {label} at {level(c.level)}
                    </td>
                    <td className="num text-right whitespace-nowrap">
                      {c.available} / {audit.replications}
                    </td>
                    <td className="num text-right whitespace-nowrap">
                      {c.coverage === null ? '—' : pct(c.coverage, 3)}
                      {c.mcse !== null ? ` ± ${pct(c.mcse, 2)}` : ''}
                    </td>
                    <td className="num text-right">{rho(c.meanWidth)}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </ScrollBox>
      </div>
      <p className="text-xs text-[var(--color-muted)]">
        The study simulates at the estimate, not at the unknown true value: it tells how the estimators behave if the estimate were right.
        MC s.e.: the Monte Carlo standard error from {count(audit.replications, 'replication')}.
        {audit.coverage.wald.available < audit.replications ? ' Panels whose estimate fell at ρ = 0 have no Wald interval.' : ''}
        {audit.omitted.map((o) => ` Not studied: ${o.item}. ${o.reason}`).join('')}
      </p>
    </div>
  );
}
