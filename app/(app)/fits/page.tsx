import type { Metadata } from 'next';
import Link from 'next/link';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { listFits } from '@/lib/dal/fits';

export const metadata: Metadata = { title: 'Fits' };

const statusClass: Record<string, string> = {
  succeeded: 'badge',
  running: 'badge bg-[var(--color-caution-soft)] text-[var(--color-caution)]',
  queued: 'badge bg-[var(--color-caution-soft)] text-[var(--color-caution)]',
  failed: 'badge bg-[var(--color-bad-soft)] text-[var(--color-bad)]',
  cancelled: 'badge bg-[#eee] text-[var(--color-muted)]',
};

export default async function FitsPage({ searchParams }: { searchParams: Promise<{ segment?: string }> }) {
  const actor = await requireUser();
  const { segment } = await searchParams;
  const fits = await listFits(actor);
  const shown = segment ? fits.filter((f) => f.segments.includes(segment)) : fits;
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div>
          <h1>Fits</h1>
          <p className="mt-1 text-sm text-[var(--color-muted)]">
            Each run estimates the correlation of the chosen segments of one dataset. Tick two or more finished runs to compare them.
          </p>
        </div>
        {can(actor.role, 'fits:run') ? (
          <Link href="/fits/new" className="btn no-underline">
            New fit
          </Link>
        ) : null}
      </div>
      {segment ? (
        <p className="text-sm">
          Runs that include <strong>{segment}</strong> · <Link href="/fits">show all</Link>
        </p>
      ) : null}
      <form action="/fits/compare" method="get" className="panel p-4">
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
              <th>When (UTC)</th>
            </tr>
          </thead>
          <tbody>
            {shown.map((f) => (
              <tr key={f.id} data-testid={`fit-row-${f.id}`}>
                <td>
                  {f.status === 'succeeded' ? <input type="checkbox" name="ids" value={f.id} aria-label={`Compare fit ${f.id}`} /> : null}
                </td>
                <td>
                  <Link href={`/fits/${f.id}`}>#{f.id}</Link>
                </td>
                <td>
                  #{f.datasetId} {f.datasetName}
                </td>
                <td className="text-sm">{f.segments.length > 0 ? f.segments.join(', ') : 'all'}</td>
                <td>
                  <span className={statusClass[f.status]}>{f.status}</span>
                  {f.status === 'running' ? <span className="num ml-1 text-xs">{f.progress}%</span> : null}
                </td>
                <td>{f.createdBy}</td>
                <td className="num whitespace-nowrap text-sm">{f.createdAt.replace('T', ' ').slice(0, 16)}</td>
              </tr>
            ))}
            {shown.length === 0 ? (
              <tr>
                <td colSpan={7} className="text-[var(--color-muted)]">
                  No fits yet.
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
        {segment ? <input type="hidden" name="segment" value={segment} /> : null}
        <button type="submit" className="btn btn-quiet mt-3">
          Compare ticked runs
        </button>
      </form>
    </div>
  );
}
