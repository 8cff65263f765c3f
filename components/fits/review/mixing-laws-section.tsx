import { ScrollBox } from '@/components/layout/scroll-box';
import { fixed, integer, level, pct, rho } from '@/lib/format';
import {
  equivalentRhoText,
  fittedLawsOf,
  lrTestSentences,
  mixingLawNotes,
  MIXING_LAW_LABELS,
  nuIdentificationSentence,
  nuText,
  observedExceedance,
  openInterval,
  parametersText,
  PIT_INTRODUCTION,
  pitRows,
  pitSentences,
  powerSentence,
  smallRho,
  tailCurves,
} from '@/lib/fits/mixing-laws-view';
import { MixingLawsTailChart } from '../mixing-laws-chart';
import type { ReviewContext } from './types';

/** A ratio to the Gaussian law's value: "×1.42". */
function ratio(x: number): string {
  return Number.isFinite(x) ? `×${x.toFixed(2)}` : '—';
}

/**
 * The challenge of the Gaussian copula: the other mixing laws fitted to the same years (the t
 * copula, beta and logit-normal mixing) side by side with the Gaussian one, what each implies for
 * the tail, the likelihood-ratio test of the Gaussian against the t copula with its bootstrap
 * p-value, the power of that test at these cohort sizes, the cautions, the tail chart, and each law's
 * probability integral transform of every year with its uniformity test and tail years.
 */
export function MixingLawsSection({ seg }: ReviewContext) {
  const mc = seg.modelComparison;
  if (!mc) return <p className="text-sm text-[var(--color-muted)]">The other mixing laws were not fitted for this run.</p>;
  const t = seg.estimates.tCopula;
  const notes = mixingLawNotes(seg);
  const lv = level(seg.level);
  const laws = fittedLawsOf(seg);
  const curves = tailCurves(laws);
  const power = powerSentence(mc);
  const nuWeak = nuIdentificationSentence(t);
  const pitTable = pitRows(seg);
  const pitText = pitSentences(seg);
  return (
    <div className="space-y-4">
      <p className="text-sm">
        Every number of this review assumes the Gaussian copula: a normal systematic factor, which gives no tail dependence, so many
        obligors defaulting together in a severe year is as unlikely as the normal law makes it. Here the same years are fitted by laws
        with other tails (a t copula, whose common mixing variable makes joint defaults likelier in bad years, and beta and logit-normal
        mixing of the default rate), to see whether the data prefer a fatter joint tail and what the choice costs.
      </p>
      {notes.map((n) => (
        <p key={n} className="text-sm" data-testid="mixing-law-note">
          {n}
        </p>
      ))}
      {mc.cautions.length > 0 ? (
        <ul className="notice-caution list-disc space-y-1 pl-8 text-sm" data-testid="mixing-law-cautions" aria-label="Cautions of the mixing laws">
          {mc.cautions.map((c) => (
            <li key={c}>{c}</li>
          ))}
        </ul>
      ) : null}
      {mc.laws.length > 0 ? (
        <>
          <ScrollBox label="The mixing laws side by side">
            <table className="table text-sm" data-testid="mixing-laws-table">
              <thead>
                <tr>
                  <th className="min-w-[15rem]">Law and fitted values</th>
                  <th className="text-right">Log-likelihood</th>
                  <th className="text-right">
                    <abbr title="number of free parameters">k</abbr>
                  </th>
                  <th className="text-right">AIC</th>
                  <th className="text-right">BIC</th>
                  <th className="text-right">99% rate</th>
                  <th className="text-right">99.9% rate</th>
                  <th className="text-right">Joint default</th>
                  <th className="text-right">Default correlation</th>
                  <th className="text-right">Tail dependence</th>
                </tr>
              </thead>
              <tbody>
                {mc.laws.map((l) => {
                  const eq = equivalentRhoText(l.law, seg);
                  return (
                    <tr key={l.law}>
                      <td>
                        {MIXING_LAW_LABELS[l.law]}{' '}
                        <span className="num block text-xs">{parametersText(l.law, seg)}</span>
                        {l.law === 't' && t ? (
                          <span className="block text-xs text-[var(--color-muted)]">
                            {lv} interval of ρ {openInterval(t.intervals.profile)}, of ν {openInterval(t.nuInterval, (v) => fixed(v, 2))}
                          </span>
                        ) : null}
                        {l.law === 'gaussian' ? (
                          <span className="block text-xs text-[var(--color-muted)]">
                            {lv} interval of ρ {openInterval(seg.estimates.binomialMle.intervals.profile)}
                          </span>
                        ) : null}
                        {eq ? <span className="block text-xs text-[var(--color-muted)]">equivalent ρ {eq}</span> : null}
                      </td>
                      <td className="num text-right">{fixed(l.logLik, 3)}</td>
                      <td className="num text-right">{l.parameters}</td>
                      <td className="num text-right">{fixed(l.aic, 2)}</td>
                      <td className="num text-right">{fixed(l.bic, 2)}</td>
                      <td className="num text-right whitespace-nowrap">
                        {pct(l.quantile99)}
                        {l.law !== 'gaussian' ? <span className="block text-xs text-[var(--color-muted)]">{ratio(l.quantile99Ratio)}</span> : null}
                      </td>
                      <td className="num text-right whitespace-nowrap">
                        {pct(l.quantile999)}
                        {l.law !== 'gaussian' ? <span className="block text-xs text-[var(--color-muted)]">{ratio(l.quantile999Ratio)}</span> : null}
                      </td>
                      <td className="num text-right">{l.jointDefault.toExponential(3)}</td>
                      <td className="num text-right">{smallRho(l.defaultCorrelation)}</td>
                      <td className="num text-right">{l.tailDependence === null ? 'none' : rho(l.tailDependence)}</td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </ScrollBox>
          <p className="text-xs text-[var(--color-muted)]">
            AIC = 2k − 2 log-likelihood; BIC = k log T − 2 log-likelihood, where BIC uses the number of years (T = {seg.T}) as the sample
            size, since the years, not the obligors, are the independent draws of the mixing variable. Lower is better for both. k: the
            number of free parameters. The 99% and 99.9% rates are default-rate quantiles of an infinitely large pool; below each, the ratio to the Gaussian law&apos;s. Joint default: the probability
            that two obligors both default in one year. Tail dependence: of the latent variables, 0 under the Gaussian copula; beta and logit-normal
            mixing have no latent variables. The equivalent
            ρ of beta and logit-normal mixing is the Gaussian ρ with the same PD and joint default probability. An unbounded interval end
            means the profile likelihood stays above its cut-off to the edge of the range.
          </p>
        </>
      ) : null}
      <div className="space-y-2 text-sm" data-testid="mixing-law-test">
        {lrTestSentences(mc, t).map((s) => (
          <p key={s}>{s}</p>
        ))}
        {power ? <p data-testid="mixing-law-power">{power}</p> : null}
        {t && t.status === 'ok' && t.nu !== null ? (
          <p>
            The t copula&apos;s degrees of freedom: ν = {nuText(t.nu, t.status)}, {lv} profile interval {openInterval(t.nuInterval, (v) => fixed(v, 2))}.
          </p>
        ) : null}
        {nuWeak ? <p data-testid="nu-weak">{nuWeak}</p> : null}
        {t?.reason && t.status === 'ok' && !nuWeak ? <p className="text-[var(--color-muted)]">{t.reason}</p> : null}
      </div>
      {laws.length > 0 ? (
        <div className="max-w-3xl">
          <MixingLawsTailChart curves={curves} observed={observedExceedance(seg.observed.map((o) => o.dr))} />
          <p className="mt-1 text-xs text-[var(--color-muted)]">
            For each fitted law, the probability that a year&apos;s default rate exceeds x (an infinitely large pool), on a logarithmic
            scale down to 1 in 10,000. Dots: the observed default rates, the i-th highest of the {seg.T} years drawn at i / (T + 1); ticks on
            the axis mark the same rates. Where a law&apos;s curve lies to the right of the Gaussian one low in the chart, that law expects worse
            severe years.
            {curves
              .filter((c) => c.points === null)
              .map((c) => ` ${MIXING_LAW_LABELS[c.law]} is not drawn: ${'reason' in c ? c.reason : ''}`)
              .join('')}
          </p>
        </div>
      ) : null}
      {pitText.length > 0 ? (
        <div className="space-y-2 text-sm" data-testid="mixing-law-pit">
          {pitTable.length > 0 ? (
            <>
              <p>{PIT_INTRODUCTION}</p>
              <ScrollBox label="The probability integral transform of each year under each law">
                <table className="table text-sm" data-testid="mixing-law-pit-table">
                  <caption className="sr-only">Probability integral transform (PIT) of each year&apos;s default count under each law</caption>
                  <thead>
                    <tr>
                      <th>Year</th>
                      <th className="text-right">Defaults</th>
                      {pitTable[0].cells.map((c) => (
                        <th key={c.law} className="text-right">
                          {MIXING_LAW_LABELS[c.law]}
                        </th>
                      ))}
                    </tr>
                  </thead>
                  <tbody>
                    {pitTable.map((r) => (
                      <tr key={r.period}>
                        <td>{r.period}</td>
                        <td className="num text-right whitespace-nowrap">
                          {integer(r.defaults)} of {integer(r.obligors)}
                        </td>
                        {r.cells.map((c) => (
                          <td key={c.law} className={`num text-right${c.tail ? ' font-semibold' : ''}`}>
                            {fixed(c.value, 3)}
                            {c.tail ? <span className="block text-xs text-[var(--color-muted)]">{c.tail} tail</span> : null}
                          </td>
                        ))}
                      </tr>
                    ))}
                  </tbody>
                </table>
              </ScrollBox>
            </>
          ) : null}
          {pitText.map((s) => (
            <p key={s}>{s}</p>
          ))}
        </div>
      ) : null}
      <p className="text-xs text-[var(--color-muted)]">
        These comparisons inform, they do not decide: they do not replace independent validation, the institution&apos;s model-risk policy,
        supervisory requirements or qualified professional judgement.
      </p>
    </div>
  );
}
