import Link from 'next/link';
import { ScrollBox } from '@/components/layout/scroll-box';
import { intervalMethodLabel } from '@/lib/assumptions/content';
import type { LibraryEntryDto } from '@/lib/dal/assumptions';
import { interval, level, pd, rho } from '@/lib/format';
import { valueSourceLabel } from '@/lib/assumptions/posterior-evidence';
import { nuText } from '@/lib/assumptions/t-copula-evidence';
import { EvidenceBadge } from './evidence-badge';
import { HealthBadge, StatusBadge } from './status-badge';

/** The library, one row per segment: the value to use, the estimate and its interval, the PD and the dates. */
export function LibraryTable({ entries, showPending, emptyText }: { entries: LibraryEntryDto[]; showPending: boolean; emptyText: string }) {
  return (
    <ScrollBox label="Assumptions (the table scrolls sideways on narrow screens)" className="panel p-2">
      <table className="table" aria-label="Published assumptions">
        <thead>
          <tr>
            <th>Segment</th>
            <th className="text-right">Value</th>
            <th className="text-right">Estimate</th>
            <th>Interval</th>
            <th className="text-right">PD</th>
            <th>Effective</th>
            <th>Review by</th>
            <th>State</th>
            {showPending ? <th>In progress</th> : null}
          </tr>
        </thead>
        <tbody>
          {entries.map((e) => (
            <tr key={e.assumptionId} data-testid={`library-row-${e.segment}`}>
              <td>
                {e.current || e.pending ? <Link href={`/library/versions/${(e.current ?? e.pending)!.id}`}>{e.segment}</Link> : e.segment}
                {e.note ? <span className="block text-xs text-[var(--color-muted)]">{e.note}</span> : null}
              </td>
              <td className="num text-right font-semibold" data-testid="library-value">
                {e.current ? rho(e.current.finalValue) : '—'}
              </td>
              <td className="num text-right whitespace-nowrap">
                {e.current ? rho(e.current.estimate) : '—'}
                {e.current ? (
                  <span className="block font-sans text-xs text-[var(--color-muted)]">
                    {valueSourceLabel(e.current.estimator)}
                    {e.current.mixingLaw === 't' ? `, t copula with nu ${nuText(e.current.nu)}` : ''}
                  </span>
                ) : null}
              </td>
              <td className="num whitespace-nowrap">
                {e.current ? (
                  <>
                    {interval(e.current.intervalLower, e.current.intervalUpper)}
                    <span className="block font-sans text-xs text-[var(--color-muted)]">
                      {intervalMethodLabel(e.current.intervalMethod)}, {level(e.current.intervalLevel)}
                    </span>
                  </>
                ) : (
                  '—'
                )}
              </td>
              <td className="num text-right">{e.current ? pd(e.current.pd) : '—'}</td>
              <td className="num whitespace-nowrap">{e.current?.effectiveDate ?? '—'}</td>
              <td className="num whitespace-nowrap">{e.current?.reviewBy ?? '—'}</td>
              <td className="whitespace-nowrap">
                {e.current ? <StatusBadge status={e.current.status} /> : null} <HealthBadge health={e.health} days={e.daysToReview} />{' '}
                <EvidenceBadge evidence={e.evidence} />
              </td>
              {showPending ? (
                <td>
                  {e.pending ? (
                    <Link href={`/library/versions/${e.pending.id}`}>
                      v{e.pending.version} <StatusBadge status={e.pending.status} />
                    </Link>
                  ) : (
                    '—'
                  )}
                </td>
              ) : null}
            </tr>
          ))}
          {entries.length === 0 ? (
            <tr>
              <td colSpan={showPending ? 9 : 8} className="text-[var(--color-muted)]">
                {emptyText}
              </td>
            </tr>
          ) : null}
        </tbody>
      </table>
    </ScrollBox>
  );
}
