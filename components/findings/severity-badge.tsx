import type { FindingSeverity } from '@/db/schema';

const tone: Record<FindingSeverity, string> = {
  high: 'bg-[var(--color-bad-soft)] text-[var(--color-bad)]',
  medium: 'bg-[var(--color-caution-soft)] text-[var(--color-caution)]',
  low: 'bg-[#eeeeea] text-[var(--color-muted)]',
};

export function SeverityBadge({ severity }: { severity: FindingSeverity }) {
  return <span className={`badge ${tone[severity]}`}>{severity}</span>;
}
