import { ScrollBox } from '@/components/layout/scroll-box';
import Link from 'next/link';
import { count, interval, pd, rho } from '@/lib/format';
import { segmentHref, segmentsInOrder, type FitResults } from '@/lib/fits/results';
import { warningLabel } from '@/lib/fits/warning-labels';
import { estimatorLabel } from '@/lib/stats/estimators/types';
import { splitWarnings } from './review/summary';

/**
 * The overview of a fit's segments, one row each in the run's order: the estimate the review leads
 * with, its profile interval and PD, the window, the cautions and notes by short name, a failed
 * segment's reason, and the links to its review page and (for analysts) to draft from it.
 */
export function SegmentsOverview({ fitId, results, mayDraft }: { fitId: number; results: FitResults; mayDraft: boolean }) {
  return (
    <ScrollBox label="Segments of this fit">
      <table className="table" data-testid="segments-overview">
        <thead>
          <tr>
            <th>Segment</th>
            <th className="text-right">ρ</th>
            <th className="text-right">Interval</th>
            <th className="text-right">PD</th>
            <th>Window</th>
            <th>Cautions and notes</th>
            <th>
              <span className="sr-only">Links</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {segmentsInOrder(results).map((item) => {
            if (item.kind === 'failed') {
              const f = item.failure;
              return (
                <tr key={`failed-${f.segment}`} data-testid="segment-failed" className="bg-[var(--color-bad-soft)]">
                  <td>{f.segment}</td>
                  <td colSpan={5} className="text-sm text-[var(--color-bad)]">
                    Not fitted: {f.reason} The other segments of this run were fitted as usual.
                  </td>
                  <td />
                </tr>
              );
            }
            const s = item.fit;
            const chosen = s.estimates[s.chosen] ?? s.estimates.binomialMle;
            const profile = s.estimates.binomialMle.intervals.profile;
            const { cautions, notes } = splitWarnings(s);
            return (
              <tr key={s.segment} data-testid={`overview-row-${item.index}`}>
                <td>
                  <Link href={segmentHref(fitId, s.segment)}>{s.segment}</Link>
                </td>
                <td className="num text-right whitespace-nowrap">
                  {rho(chosen.rho)}
                  <span className="block text-xs text-[var(--color-muted)] font-sans">{estimatorLabel(s.chosen)}</span>
                </td>
                <td className="num text-right whitespace-nowrap">{s.chosen === 'binomialMle' && profile ? interval(profile.lower, profile.upper) : '—'}</td>
                <td className="num text-right">{pd(chosen.pd)}</td>
                <td className="whitespace-nowrap text-sm">
                  {s.periods[0]}–{s.periods[s.periods.length - 1]} <span className="text-[var(--color-muted)]">({count(s.T, 'period')})</span>
                </td>
                <td className="text-sm">
                  {cautions.length === 0 && notes.length === 0 ? <span className="text-[var(--color-muted)]">none</span> : null}
                  {cautions.map((w) => (
                    <span key={w.code} className="badge mr-1 mb-1 bg-[var(--color-caution-soft)] text-[var(--color-caution)]" title={w.message}>
                      {warningLabel(w.code)}
                    </span>
                  ))}
                  {notes.map((w) => (
                    <span key={w.code} className="badge mr-1 mb-1 bg-[#eeeeea] text-[var(--color-muted)]" title={w.message}>
                      {warningLabel(w.code)}
                    </span>
                  ))}
                </td>
                <td className="whitespace-nowrap text-sm">
                  <Link href={segmentHref(fitId, s.segment)} aria-label={`Review ${s.segment}`}>
                    Review
                  </Link>
                  {mayDraft && s.estimates.binomialMle.rho !== null ? (
                    <>
                      {' · '}
                      <Link
                        href={`/library/new?fitId=${fitId}&segment=${encodeURIComponent(s.segment)}`}
                        aria-label={`Draft an assumption for ${s.segment} from this fit`}
                        data-testid={`draft-from-fit-${item.index}`}
                      >
                        Draft
                      </Link>
                    </>
                  ) : null}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </ScrollBox>
  );
}
