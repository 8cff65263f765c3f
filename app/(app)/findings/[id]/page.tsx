import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { FindingActions } from '@/components/findings/finding-actions';
import { SeverityBadge } from '@/components/findings/severity-badge';
import { requireUser } from '@/lib/auth/session';
import { getFinding } from '@/lib/dal/findings';
import { AppError } from '@/lib/errors';
import { findingStatusLabels } from '@/lib/findings/rules';
import { routeId } from '@/lib/http/route-params';

export const metadata: Metadata = { title: 'Finding' };

const label = (s: string | null) => (s ? (findingStatusLabels[s as keyof typeof findingStatusLabels] ?? s) : '—');

export default async function FindingPage({ params }: { params: Promise<{ id: string }> }) {
  const actor = await requireUser();
  const f = await routeId({ params }, 'id', 'not_found:finding', 'There is no such finding.')
    .then((id) => getFinding(actor, id))
    .catch((err) => {
      if (err instanceof AppError && err.kind === 'not_found') notFound();
      throw err;
    });
  return (
    <div className="space-y-5">
      <p className="text-sm">
        <Link href="/findings">Findings</Link> / {f.id}
      </p>
      <div>
        <h1 className="flex flex-wrap items-center gap-2">
          {f.title} <SeverityBadge severity={f.severity} />
        </h1>
        <p className="mt-1 text-sm text-[var(--color-muted)]">
          Finding {f.id} on <Link href={f.target.url}>{f.target.label}</Link> · {f.statusLabel} · owner {f.owner?.name ?? '—'} · due{' '}
          <span className={f.overdue ? 'font-medium text-[var(--color-bad)]' : ''}>
            {f.dueDate}
            {f.overdue ? ` (${-f.daysToDue} days overdue)` : ''}
          </span>{' '}
          · recorded by {f.recordedBy?.name ?? '—'} on {f.createdAt.slice(0, 10)}
        </p>
      </div>
      <section className="grid gap-4 lg:grid-cols-3">
        <div className="panel space-y-3 p-5 lg:col-span-2">
          <h2>Description</h2>
          <p className="whitespace-pre-wrap text-sm">{f.description}</p>
          {f.rationale ? (
            <>
              <h3>Rationale for accepting</h3>
              <p className="whitespace-pre-wrap text-sm">{f.rationale}</p>
            </>
          ) : null}
          <h2 className="pt-2">History</h2>
          <table className="table" aria-label="History of the finding">
            <thead>
              <tr>
                <th>When (UTC)</th>
                <th>Who</th>
                <th>What</th>
                <th>Comment</th>
              </tr>
            </thead>
            <tbody>
              {f.events.map((e) => (
                <tr key={e.id}>
                  <td className="num whitespace-nowrap">{e.at.replace('T', ' ').slice(0, 16)}</td>
                  <td>{e.actorEmail}</td>
                  <td>{e.kind === 'recorded' ? 'recorded' : e.kind === 'comment' ? 'comment' : `${label(e.fromStatus)} → ${label(e.toStatus)}`}</td>
                  <td className="whitespace-pre-wrap">{e.comment ?? ''}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <p className="text-xs text-[var(--color-muted)]">The history is append-only: the database refuses changes to its rows.</p>
        </div>
        <div className="panel space-y-3 p-5">
          <h2>Your action</h2>
          <FindingActions id={f.id} statuses={f.may.statuses} mayComment={f.may.comment} />
        </div>
      </section>
    </div>
  );
}
