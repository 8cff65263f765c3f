'use client';

import Link from 'next/link';
import { useState } from 'react';
import { ScrollBox } from '@/components/layout/scroll-box';
import type { FitSummaryDto } from '@/lib/dal/fits';
import { when } from '@/lib/format';

const statusClass: Record<string, string> = {
  succeeded: 'badge',
  running: 'badge bg-[var(--color-caution-soft)] text-[var(--color-caution)]',
  queued: 'badge bg-[var(--color-caution-soft)] text-[var(--color-caution)]',
  failed: 'badge bg-[var(--color-bad-soft)] text-[var(--color-bad)]',
  cancelled: 'badge bg-[#eee] text-[var(--color-muted)]',
};

/** The segments every ticked run has (null when nothing is ticked). */
function sharedSegments(ticked: FitSummaryDto[]): Set<string> | null {
  if (ticked.length === 0) return null;
  return new Set(ticked[0].segments.filter((s) => ticked.every((f) => f.segments.includes(s))));
}

/** Why a run cannot be ticked now, or null when it can. */
export function whyNotComparable(f: FitSummaryDto, shared: Set<string> | null): string | null {
  if (f.status !== 'succeeded') return `Not finished (${f.status}).`;
  if (!f.comparable) return 'Stored in an older layout: fit again to compare.';
  if (shared && !f.segments.some((s) => shared.has(s))) return 'No segment in common with the runs ticked.';
  return null;
}

/**
 * The fit runs, with a tick box on each run that can be compared: finished, in the current layout
 * and, once one is ticked, sharing a segment with every run ticked; the others are greyed out with
 * the reason beside them. The ticked runs go to Compare runs (a GET form).
 */
export function FitsTable({ fits, segment }: { fits: FitSummaryDto[]; segment?: string }) {
  const [ticked, setTicked] = useState<number[]>([]);
  const tickedRuns = fits.filter((f) => ticked.includes(f.id));
  const shared = sharedSegments(tickedRuns);
  return (
    <form action="/fits/compare" method="get" className="panel space-y-3 p-4" aria-label="Compare fits">
      <p className="text-sm" role="status" data-testid="compare-hint">
        {ticked.length === 0
          ? 'Tick two or more finished runs that share a segment to compare them.'
          : shared && shared.size > 0
            ? `${ticked.length} ticked; segments in common: ${[...shared].join(', ')}.`
            : `${ticked.length} ticked.`}
      </p>
      <ScrollBox label="Fit runs (scrolls sideways on narrow screens)">
        <table className="table">
          <thead>
            <tr>
              <th>
                <span className="sr-only">Compare</span>
              </th>
              <th>Run</th>
              <th>Dataset</th>
              <th>Segments</th>
              <th>Status</th>
              <th>Started by</th>
              <th>When</th>
            </tr>
          </thead>
          <tbody>
            {fits.map((f) => {
              const isTicked = ticked.includes(f.id);
              const why = isTicked ? null : whyNotComparable(f, shared);
              return (
                <tr key={f.id} data-testid={`fit-row-${f.id}`} className={why ? 'text-[var(--color-muted)]' : undefined}>
                  <td>
                    <input
                      type="checkbox"
                      name="ids"
                      value={f.id}
                      checked={isTicked}
                      disabled={!!why}
                      aria-label={`Compare fit ${f.id}`}
                      aria-describedby={why ? `why-${f.id}` : undefined}
                      onChange={(e) => setTicked(e.target.checked ? [...ticked, f.id] : ticked.filter((x) => x !== f.id))}
                    />
                  </td>
                  <td>
                    <Link href={`/fits/${f.id}`}>#{f.id}</Link>
                  </td>
                  <td>
                    #{f.datasetId} {f.datasetName}
                  </td>
                  <td className="text-sm">
                    {f.segments.length > 0 ? f.segments.join(', ') : 'all'}
                    {why ? (
                      <span id={`why-${f.id}`} className="block text-xs" data-testid={`why-${f.id}`}>
                        Cannot be compared now: {why}
                      </span>
                    ) : null}
                  </td>
                  <td>
                    <span className={statusClass[f.status]}>{f.status}</span>
                    {f.status === 'running' ? <span className="num ml-1 text-xs">{f.progress}%</span> : null}
                  </td>
                  <td>{f.createdBy}</td>
                  <td className="num whitespace-nowrap text-sm">{when(f.createdAt)}</td>
                </tr>
              );
            })}
            {fits.length === 0 ? (
              <tr>
                <td colSpan={7} className="text-[var(--color-muted)]">
                  No fits yet.
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </ScrollBox>
      {segment ? <input type="hidden" name="segment" value={segment} /> : shared && shared.size > 0 ? <input type="hidden" name="segment" value={[...shared][0]} /> : null}
      <button type="submit" className="btn btn-quiet" disabled={ticked.length < 2}>
        Compare ticked runs
      </button>
    </form>
  );
}
