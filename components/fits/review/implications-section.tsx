import { ScrollBox } from '@/components/layout/scroll-box';
import Link from 'next/link';
import { PairExplorer } from '@/components/pairs/pair-explorer';
import { assetClassNames } from '@/lib/asset-classes';
import { capitalCaution } from '@/lib/assumptions/cautions';
import { interval, pct, pd, rho } from '@/lib/format';
import type { ReviewContext } from './types';

/**
 * What the estimate means in plain numbers: the 99.9% default-rate quantile, IRB capital K at the
 * estimate and the interval ends (an illustration under a stated LGD and maturity), the supervisory
 * correlation of the segment's asset class, and two obligors' joint default.
 */
export function ImplicationsSection({ seg, fitId }: ReviewContext) {
  const imp = seg.implications;
  const iv = seg.estimates.binomialMle.intervals;
  if (!imp) {
    return <p className="text-sm text-[var(--color-muted)]">Nothing to show: there is no likelihood estimate to draw implications from.</p>;
  }
  const lgdAndMaturity = `LGD ${pct(imp.lgd, 2)}${imp.maturityYears !== null ? `, maturity ${imp.maturityYears} years` : ', no maturity adjustment'}`;
  return (
    <div className="space-y-4">
      <ScrollBox label="What the estimate means">
        <table className="table text-sm" data-testid="implications">
          <tbody>
            <tr>
              <td>
                99.9% quantile of the yearly default rate (PD {pd(imp.pd)}, ρ {rho(imp.rho)})
              </td>
              <td className="num text-right">{pd(imp.quantile999)}</td>
            </tr>
            <tr>
              <td>Illustrative IRB capital K at the estimate ({lgdAndMaturity})</td>
              <td className="num text-right">{pct(imp.capital.atEstimate)}</td>
            </tr>
            <tr>
              <td>K at the ends of the profile interval {iv.profile ? interval(iv.profile.lower, iv.profile.upper) : ''}</td>
              <td className="num text-right whitespace-nowrap">
                {pct(imp.capital.atLower)} – {pct(imp.capital.atUpper)}
              </td>
            </tr>
            <tr data-testid="supervisory-row">
              {seg.assetClass === 'none' ? (
                <td colSpan={2}>
                  Supervisory correlation: no asset class is set for this segment, so there is no supervisory benchmark. Set the asset class on
                  the segment&apos;s page under Data (Segment settings) and fit again to compare.
                </td>
              ) : (
                <>
                  <td>
                    Supervisory correlation for {assetClassNames[seg.assetClass]}
                    {imp.supervisory ? ' and K with it' : ''}
                  </td>
                  <td className="num text-right whitespace-nowrap">
                    {imp.supervisory ? `ρ ${rho(imp.supervisory.rho)} · K ${pct(imp.supervisory.capital)}` : 'not available (see the notes above)'}
                  </td>
                </>
              )}
            </tr>
            <tr>
              <td>Two obligors at the fitted PD: joint default probability (independent: {pd(imp.pair.independent)})</td>
              <td className="num text-right">{pd(imp.pair.joint)}</td>
            </tr>
            <tr>
              <td>Their default correlation</td>
              <td className="num text-right">{rho(imp.pair.defaultCorrelation)}</td>
            </tr>
          </tbody>
        </table>
      </ScrollBox>
      <p className="notice-caution text-xs" data-testid="capital-caution">
        {capitalCaution(imp.lgd, imp.maturityYears)} {imp.convention}
      </p>
      <details>
        <summary className="cursor-pointer text-sm text-[var(--color-accent)]">Explore two obligors at this estimate</summary>
        {fitId !== undefined ? (
          <p className="mt-2 text-sm">
            Or open them in the <Link href={`/pairs?fitId=${fitId}&segment=${encodeURIComponent(seg.segment)}`}>Pair explorer</Link>.
          </p>
        ) : null}
        <div className="mt-3">
          <PairExplorer initialPdA={imp.pd} initialPdB={imp.pd} initialRho={imp.rho} heading="Two obligors at the fitted PD" />
        </div>
      </details>
    </div>
  );
}
