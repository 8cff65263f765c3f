import type { Metadata } from 'next';
import Link from 'next/link';
import { StatusBadge } from '@/components/assumptions/status-badge';
import { ScrollBox } from '@/components/layout/scroll-box';
import { requireUser } from '@/lib/auth/session';
import { listQueue } from '@/lib/dal/assumptions';
import { listMatrixQueue } from '@/lib/dal/factor-matrices';
import { when } from '@/lib/format';

export const metadata: Metadata = { title: 'Queue' };

export default async function QueuePage() {
  const actor = await requireUser();
  // Segment versions and factor-correlation matrix versions, oldest change first.
  const items = [...(await listQueue(actor)), ...(await listMatrixQueue(actor))].sort((a, b) => a.updatedAt.localeCompare(b.updatedAt));
  const explain =
    actor.role === 'validator'
      ? 'What awaits you: versions submitted for review that you did not draft or edit, and reviews you have started.'
      : actor.role === 'analyst'
        ? 'What awaits you: your drafts that a validator sent back with a request for changes.'
        : 'Only analysts and validators have a queue.';
  return (
    <div className="space-y-4">
      <h1>Queue</h1>
      <p className="text-sm text-[var(--color-muted)]">{explain}</p>
      <ScrollBox label="Queue (scrolls sideways on narrow screens)" className="panel p-2">
        <table className="table" aria-label="Queue">
          <thead>
            <tr>
              <th>Segment or matrix</th>
              <th>Version</th>
              <th>State</th>
              <th>Why</th>
              <th>Since</th>
            </tr>
          </thead>
          <tbody>
            {items.map((i) => (
              <tr key={i.href}>
                <td>
                  <Link href={i.href}>{i.segment}</Link>
                </td>
                <td>v{i.version}</td>
                <td>
                  <StatusBadge status={i.status} />
                </td>
                <td className="whitespace-pre-wrap">{i.why}</td>
                <td className="num whitespace-nowrap">{when(i.updatedAt)}</td>
              </tr>
            ))}
            {items.length === 0 ? (
              <tr>
                <td colSpan={5} className="text-[var(--color-muted)]">
                  Nothing awaits you.
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </ScrollBox>
    </div>
  );
}
