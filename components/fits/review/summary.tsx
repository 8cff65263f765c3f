import { assetClassNames } from '@/lib/asset-classes';
import { count, interval, level, pd, rho } from '@/lib/format';
import type { FitSegmentResult } from '@/lib/fits/results';
import { estimatorLabel } from '@/lib/stats/estimators/types';
import { WARNING_CODES } from '@/lib/stats/fit-warnings';

/** Warnings that are cautions of DESIGN.md (short series, zero-default years, boundary, autocorrelation,
 * identification): every engine warning except the two that only say an optional part was not run. */
const CAUTION_CODES: ReadonlySet<string> = new Set(WARNING_CODES.filter((c) => c !== 'bootstrap-unavailable' && c !== 'audit-unavailable'));

/** The warnings of a segment split into cautions (read before the number) and notes. */
export function splitWarnings(seg: FitSegmentResult) {
  return {
    cautions: seg.warnings.filter((w) => CAUTION_CODES.has(w.code)),
    notes: seg.warnings.filter((w) => !CAUTION_CODES.has(w.code)),
  };
}

/**
 * The first lines of a segment's review: the estimate the review leads with, its interval and PD,
 * the window and asset class, and the segment's cautions right beside the value (the engine's, and
 * those of the other mixing laws when they were fitted).
 */
export function SegmentSummary({ seg }: { seg: FitSegmentResult }) {
  const chosen = seg.estimates[seg.chosen] ?? seg.estimates.binomialMle;
  const iv = seg.estimates.binomialMle.intervals;
  const { cautions, notes } = splitWarnings(seg);
  // the challenge of the Gaussian copula, when run: another law fits better, or the history cannot tell (mixingLawCautions)
  const copulaCautions = seg.modelComparison?.cautions ?? [];
  return (
    <div className="panel p-4" data-testid="segment-summary">
      <p>
        {chosen.rho !== null ? (
          <>
            Estimated asset correlation <strong className="num">ρ = {rho(chosen.rho)}</strong> by {estimatorLabel(seg.chosen).toLowerCase()}
            {seg.chosen === 'binomialMle' && iv.profile ? (
              <>
                , {level(seg.level)} profile-likelihood interval <span className="num">{interval(iv.profile.lower, iv.profile.upper)}</span>
              </>
            ) : null}
            , fitted with PD <span className="num">{pd(chosen.pd)}</span>
          </>
        ) : (
          <>No estimator gives a correlation for these data</>
        )}
        . {count(seg.T, 'period')}, {seg.periods[0]}–{seg.periods[seg.periods.length - 1]};{' '}
        {seg.assetClass === 'none' ? 'no asset class set' : assetClassNames[seg.assetClass]}.
      </p>
      {cautions.length + copulaCautions.length > 0 ? (
        <ul className="notice-caution mt-3 list-disc space-y-1 pl-8 text-sm" data-testid="cautions" aria-label="Cautions">
          {cautions.map((w) => (
            <li key={w.code}>{w.message}</li>
          ))}
          {copulaCautions.map((c) => (
            <li key={c} data-testid="mixing-law-caution">
              {c}
            </li>
          ))}
        </ul>
      ) : null}
      {notes.length > 0 ? (
        <ul className="mt-2 list-disc pl-5 text-sm text-[var(--color-muted)]" aria-label="Notes">
          {notes.map((w) => (
            <li key={w.code}>{w.message}</li>
          ))}
        </ul>
      ) : null}
    </div>
  );
}
