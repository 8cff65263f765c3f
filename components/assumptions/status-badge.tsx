import type { AssumptionStatus } from '@/db/schema';
import { statusLabels } from '@/lib/assumptions/lifecycle';

const tone: Record<AssumptionStatus, string> = {
  draft: 'bg-[var(--color-accent-soft)] text-[var(--color-accent)]',
  submitted: 'bg-[var(--color-caution-soft)] text-[var(--color-caution)]',
  in_review: 'bg-[var(--color-caution-soft)] text-[var(--color-caution)]',
  approved: 'bg-[var(--color-good-soft)] text-[var(--color-good)]',
  published: 'bg-[var(--color-good-soft)] text-[var(--color-good)]',
  rejected: 'bg-[var(--color-bad-soft)] text-[var(--color-bad)]',
  superseded: 'bg-[#eeeeea] text-[var(--color-muted)]',
  expired: 'bg-[var(--color-bad-soft)] text-[var(--color-bad)]',
  retired: 'bg-[#eeeeea] text-[var(--color-muted)]',
};

export function StatusBadge({ status }: { status: AssumptionStatus }) {
  return (
    <span className={`badge ${tone[status]}`} data-testid="status-badge">
      {statusLabels[status]}
    </span>
  );
}

export function HealthBadge({ health, days }: { health: 'ok' | 'expiring' | 'overdue' | 'expired' | 'none'; days: number | null }) {
  if (health === 'expired') return <span className="badge bg-[var(--color-bad-soft)] text-[var(--color-bad)]">expired</span>;
  if (health === 'overdue') {
    return (
      <span className="badge bg-[var(--color-bad-soft)] text-[var(--color-bad)]" title="Past its review-by date; still served, flagged overdue, under the overdue policy">
        overdue{days !== null ? ` ${-days} d` : ''}
      </span>
    );
  }
  if (health === 'expiring') return <span className="badge bg-[var(--color-caution-soft)] text-[var(--color-caution)]">review in {days} d</span>;
  if (health === 'ok') return <span className="badge bg-[var(--color-good-soft)] text-[var(--color-good)]">current</span>;
  return <span className="badge">not published</span>;
}
