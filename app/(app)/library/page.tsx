import type { Metadata } from 'next';
import Link from 'next/link';
import { Cautions } from '@/components/assumptions/cautions';
import { EvidenceBadge } from '@/components/assumptions/evidence-badge';
import { fmt, HealthBadge, StatusBadge } from '@/components/assumptions/status-badge';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { listLibrary } from '@/lib/dal/assumptions';

export const metadata: Metadata = { title: 'Library' };

export default async function LibraryPage() {
  const actor = await requireUser();
  const library = await listLibrary(actor);
  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <h1>Library</h1>
          <p className="text-sm text-[var(--color-muted)]">Published correlation assumptions by segment, with the value to use, its interval, PD and dates.</p>
        </div>
        <div className="ml-auto flex gap-2">
          <a className="btn btn-quiet" href="/api/assumptions/export" download>
            Export CSV
          </a>
          {can(actor.role, 'assumptions:draft') ? (
            <Link className="btn no-underline" href="/library/new">
              Draft an assumption
            </Link>
          ) : null}
        </div>
      </div>
      <section className="panel overflow-x-auto p-2">
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
              {actor.role !== 'viewer' ? <th>In progress</th> : null}
            </tr>
          </thead>
          <tbody>
            {library.map((e) => (
              <tr key={e.assumptionId} data-testid={`library-row-${e.segment}`}>
                <td>
                  {e.current || e.pending ? <Link href={`/library/versions/${(e.current ?? e.pending)!.id}`}>{e.segment}</Link> : e.segment}
                </td>
                <td className="num text-right font-semibold" data-testid="library-value">{e.current ? fmt(e.current.finalValue) : '—'}</td>
                <td className="num text-right whitespace-nowrap">
                  {e.current ? fmt(e.current.estimate) : '—'}
                  {e.current ? <span className="block text-xs text-[var(--color-muted)]">{e.current.estimator}</span> : null}
                </td>
                <td className="num whitespace-nowrap">
                  {e.current ? `[${fmt(e.current.intervalLower)}, ${fmt(e.current.intervalUpper)}] ${e.current.intervalMethod} ${fmt(e.current.intervalLevel * 100, 2)}%` : '—'}
                </td>
                <td className="num text-right">{e.current ? fmt(e.current.pd, 5) : '—'}</td>
                <td className="num whitespace-nowrap">{e.current?.effectiveDate ?? '—'}</td>
                <td className="num whitespace-nowrap">{e.current?.reviewBy ?? '—'}</td>
                <td>
                  {e.current ? <StatusBadge status={e.current.status} /> : null} <HealthBadge health={e.health} days={e.daysToReview} />{' '}
                  <EvidenceBadge evidence={e.evidence} />
                </td>
                {actor.role !== 'viewer' ? (
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
            {library.length === 0 ? (
              <tr>
                <td colSpan={9} className="text-[var(--color-muted)]">
                  Nothing published yet.
                  {can(actor.role, 'assumptions:draft') ? ' Draft an assumption from a finished fit to start.' : ''}
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </section>
      <p className="text-sm text-[var(--color-muted)]">
        Downstream models read these values through the consumer API (<a href="/api/openapi.json">OpenAPI document</a>) with a token an
        administrator creates.
      </p>
      <Cautions />
    </div>
  );
}
