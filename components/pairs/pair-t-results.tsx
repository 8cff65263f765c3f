import { fixed, pct } from '@/lib/format';
import type { PairTMetrics } from '@/lib/fits/pair-t';

/** nu as shown: four significant digits, no trailing zeros (4 -> "4", 4.23718 -> "4.237"). */
export function nuText(nu: number): string {
  return String(Number(nu.toPrecision(4)));
}

/**
 * The t copula's figures for two obligors beside the Gaussian copula's at the same PDs and
 * correlation, with the ratio of the joint default probabilities and a sentence that says it.
 */
export function PairTResults({ m }: { m: PairTMetrics }) {
  const g = m.gaussian;
  const nu = nuText(m.nu);
  const row = (label: React.ReactNode, t: string, gauss: string, testId?: string, strong = false) => (
    <tr>
      <th scope="row" className="min-w-[7rem] px-1.5! font-normal whitespace-normal! sm:px-[0.6rem]!">
        {strong ? <strong>{label}</strong> : label}
      </th>
      <td className={`num px-1.5! text-right whitespace-nowrap sm:px-[0.6rem]! ${strong ? 'font-semibold' : ''}`} data-testid={testId ? `pair-t-${testId}` : undefined}>
        {t}
      </td>
      <td className={`num px-1.5! text-right whitespace-nowrap sm:px-[0.6rem]! ${strong ? 'font-semibold' : ''}`} data-testid={testId ? `pair-${testId}` : undefined}>
        {gauss}
      </td>
    </tr>
  );
  return (
    <>
      <div className="scroll-box relative overflow-x-auto" role="region" aria-label="The t copula beside the Gaussian copula" tabIndex={0}>
        <table className="table" data-testid="pair-results">
          <thead>
            <tr>
              <th scope="col" className="px-1.5! sm:px-[0.6rem]!">
                Two obligors
              </th>
              <th scope="col" className="px-1.5! text-right whitespace-normal! sm:px-[0.6rem]!">
                t copula, ν = {nu}
              </th>
              <th scope="col" className="px-1.5! text-right sm:px-[0.6rem]!">
                Gaussian
              </th>
            </tr>
          </thead>
          <tbody>
            {row('Default threshold of A (t or normal quantile of its PD)', fixed(m.k1, 3), fixed(g.k1, 3))}
            {row('Default threshold of B', fixed(m.k2, 3), fixed(g.k2, 3))}
            {row('Joint default probability', pct(m.joint, 4), pct(g.joint, 4), 'joint', true)}
            {row('If independent (PD A × PD B)', pct(m.independent, 4), pct(g.independent, 4), 'independent')}
            {row('Default correlation', fixed(m.defaultCorrelation, 4), fixed(g.defaultCorrelation, 4), 'default-correlation')}
            {row('P(B defaults | A defaults)', pct(m.secondGivenFirst, 3), pct(g.secondGivenFirst, 3))}
            {row('Lower tail dependence λ', fixed(m.tailDependence, 4), fixed(0, 4), 'tail')}
          </tbody>
        </table>
      </div>
      <p className="text-sm" data-testid="pair-t-sentence">
        With ν = {nu} degrees of freedom the two obligors default together with probability about <strong>{pct(m.joint, 3)}</strong>,{' '}
        <strong data-testid="pair-t-ratio">{m.ratioToGaussian.toFixed(2)} times</strong> the {pct(g.joint, 3)} of the Gaussian copula at the same
        PDs and correlation {fixed(m.rho, 3)}. Each obligor keeps its PD; the common mixing variable of the t copula makes their bad years coincide
        {m.tailDependence > 0
          ? `; were both PDs equal and shrinking towards zero, P(B defaults | A defaults) would tend to λ = ${fixed(m.tailDependence, 3)}, not to 0 as under the Gaussian copula`
          : ''}
        .
      </p>
    </>
  );
}
