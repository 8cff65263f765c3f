import { count, fixed, pValue } from '@/lib/format';
import type { FitSegmentResult } from '@/lib/fits/results';
import { FactorChart } from '../svg-charts';
import type { ReviewContext } from './types';

/** The serial-dependence test on the PIT values (runs with zero-default years), or why it could not run. */
function SerialTest({ d }: { d: FitSegmentResult['diagnostics'] }) {
  // Results stored before the granular transform have neither field.
  if (d.pitSerialTest === undefined && d.pitSerialNote === undefined) return null;
  return (
    <p className="text-sm" data-testid="pit-serial">
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
      {d.pitMethod ? <span className="text-xs text-[var(--color-muted)]">Method: {d.pitMethod}.</span> : null}
    </p>
  );
}

/** The AR(1) model's likelihood-ratio test of phi = 0: the third serial-dependence check, or why it could not run. */
function PersistenceTest({ d }: { d: FitSegmentResult['diagnostics'] }) {
  // Results stored before the AR(1) model have neither field.
  if (d.lrTestPhi0 === undefined && d.lrTestPhi0Note === undefined) return null;
  return (
    <p className="text-sm" data-testid="lr-test-phi0">
      Persistence of the factor (the AR(1) model&apos;s likelihood-ratio test of φ = 0, every year included):{' '}
      {d.lrTestPhi0 ? (
        <>
          φ̂ = <span className="num">{d.lrTestPhi0.phi === null ? 'not identified' : fixed(d.lrTestPhi0.phi, 2)}</span>, statistic{' '}
          <span className="num">{fixed(d.lrTestPhi0.statistic, 2)}</span>, p-value <span className="num">{pValue(d.lrTestPhi0.pValue)}</span>.{' '}
          {d.lrTestPhi0.pValue < 0.05 ? 'Material: consecutive years are not independent.' : 'Not significant at 5%.'}
        </>
      ) : (
        <span>{d.lrTestPhi0Note}</span>
      )}
    </p>
  );
}

/**
 * The implied systematic factor of each year with its lag-1 autocorrelation, and the probability
 * integral transform (PIT) of each year's default count under the fitted model with its serial test.
 */
export function FactorSection({ seg }: ReviewContext) {
  const d = seg.diagnostics;
  const outer = d.pit ? d.pit.filter((u) => u < 0.1 || u > 0.9).length : 0;
  return (
    <div className="grid gap-4 xl:grid-cols-[3fr_2fr]">
      <div>
        {d.impliedFactor ? (
          <FactorChart periods={seg.periods} factor={d.impliedFactor} pit={d.pit} />
        ) : (
          <p className="text-sm text-[var(--color-muted)]">{d.fittedNote ?? 'No implied factor.'}</p>
        )}
      </div>
      <div className="space-y-2">
        <p className="text-sm">
          The probability integral transform (PIT) of a year is the fitted model&apos;s probability of fewer defaults than observed plus half
          the probability of exactly as many; under a well-fitting model the values spread evenly over 0–1.
        </p>
        {d.impliedFactor ? (
          <p className="text-sm" data-testid="autocorrelation">
            Lag-1 autocorrelation of the implied factor:{' '}
            {d.lag1Autocorrelation === null ? (
              <span>{d.autocorrelationNote ?? 'not computed (a period with a 0% or 100% default rate has no finite factor, or fewer than 5 periods)'}</span>
            ) : (
              <>
                <span className="num">{fixed(d.lag1Autocorrelation, 2)}</span>, against ±{fixed(d.autocorrelationThreshold, 2)} for independent
                years (1.96/√T). {Math.abs(d.lag1Autocorrelation) > d.autocorrelationThreshold ? 'Material: the intervals are too narrow.' : 'Within that band.'}
              </>
            )}
            {d.pit ? ` Here ${outer} of ${count(seg.T, 'PIT value')} lie in the outer tenths (about ${(0.2 * seg.T).toFixed(1)} expected).` : ''}
          </p>
        ) : null}
        <SerialTest d={d} />
        <PersistenceTest d={d} />
        <p className="text-xs text-[var(--color-muted)]">
          {count(d.zeroDefaultPeriods, 'period')} without a default, {d.allDefaultPeriods} with every obligor in default.
        </p>
      </div>
    </div>
  );
}
