import Link from 'next/link';
import { StatusBadge } from '@/components/assumptions/status-badge';
import type { MatrixLibraryEntryDto } from '@/lib/dal/factor-matrices';

/** The library's factor-correlation matrices: one row per set of segments, its newest version and the published one. */
export function MatrixLibraryTable({ entries }: { entries: readonly MatrixLibraryEntryDto[] }) {
  if (!entries.length) {
    return <p className="text-sm text-[var(--color-muted)]">No matrix yet. Draft one from a fit with correlations between segments (its “Draft as an assumption”).</p>;
  }
  return (
    <div className="overflow-x-auto">
      <table className="table" aria-label="Factor-correlation matrices" data-testid="matrix-library">
        <thead>
          <tr>
            <th scope="col">Segments</th>
            <th scope="col">Latest version</th>
            <th scope="col">State</th>
            <th scope="col">Effective</th>
            <th scope="col">Review by</th>
            <th scope="col">Published now</th>
          </tr>
        </thead>
        <tbody>
          {entries.map((e) => (
            <tr key={e.matrixId}>
              <th scope="row" className="font-normal">
                <Link href={`/library/matrices/${e.latest.id}`}>{e.segments.join(', ')}</Link>
              </th>
              <td className="num">v{e.latest.version}</td>
              <td>
                <StatusBadge status={e.latest.status} />
              </td>
              <td className="num">{e.latest.effectiveDate}</td>
              <td className="num">{e.latest.reviewBy}</td>
              <td>{e.published ? <Link href={`/library/matrices/${e.published.id}`}>v{e.published.version} since {e.published.effectiveDate}</Link> : '—'}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
