import Link from 'next/link';
import type { EvidenceDto } from '@/lib/dal/evidence-store';
import { pd as pdText, rho as rhoText } from '@/lib/format';

const verdictTone = {
  consistent: 'bg-[var(--color-good-soft)] text-[var(--color-good)]',
  watch: 'bg-[var(--color-caution-soft)] text-[var(--color-caution)]',
  breach: 'bg-[var(--color-bad-soft)] text-[var(--color-bad)]',
} as const;

/** The monitoring of a version whose evidence has aged: the newer data and the backtest of the published value on it. */
export function EvidencePanel({ evidence }: { evidence: EvidenceDto }) {
  if (!evidence.flagged) return null;
  const b = evidence.backtest;
  return (
    <section className="panel space-y-2 p-5" aria-labelledby="monitoring-heading" data-testid="evidence-panel">
      <h2 id="monitoring-heading">Monitoring on newer data</h2>
      <p className="text-sm">
        {evidence.superseded ? 'The dataset of this value has been superseded' : 'A newer dataset covers later years of this segment'}
        {evidence.newerDatasetId ? (
          <>
            {': '}
            <Link href={`/data/${evidence.newerDatasetId}`}>
              dataset {evidence.newerDatasetId}
              {evidence.newerDatasetName ? ` “${evidence.newerDatasetName}”` : ''}
            </Link>
          </>
        ) : null}
        {evidence.newPeriods.length ? `, new years ${evidence.newPeriods.join(', ')}.` : ', with no years after this value’s window.'}
      </p>
      {!evidence.newPeriods.length ? (
        <p className="text-sm text-[var(--color-muted)]">There are no new years to backtest the value on.</p>
      ) : !b || b.status === 'queued' ? (
        <p className="text-sm text-[var(--color-muted)]" data-testid="backtest-pending">
          The worker backtests the published value and PD on the new years; the result appears here.
        </p>
      ) : b.status === 'failed' ? (
        <p className="notice-bad text-sm">The backtest could not run: {b.error}</p>
      ) : b.result ? (
        <div className="space-y-2 text-sm" data-testid="backtest-result">
          <p>
            <span className={`badge ${verdictTone[b.verdict ?? 'watch']}`}>{b.verdict}</span> {b.summary}
          </p>
          <ul className="list-disc pl-5">
            {b.years.map((y) => (
              <li key={y}>{y}</li>
            ))}
          </ul>
          <p className="text-xs text-[var(--color-muted)]">
            Tested at the published value {rhoText(b.result.rho)} with the PD {pdText(b.result.p)}; quantiles of an infinitely granular pool, probabilities under the binomial
            mixture with each year&apos;s cohort; engine {b.engineVersion}. A backtest on a few years has little power: agreement is not proof that the value
            still holds.
          </p>
        </div>
      ) : null}
    </section>
  );
}
