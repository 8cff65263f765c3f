import type { EvidenceDto } from '@/lib/dal/evidence-store';

/** A short flag for lists: the evidence behind the value has aged (superseded data or newer years). */
export function EvidenceBadge({ evidence }: { evidence: EvidenceDto | null }) {
  if (!evidence?.flagged) return null;
  const text = evidence.superseded ? 'data superseded' : `newer data ${evidence.newPeriods.join(', ')}`;
  const verdict = evidence.backtest?.verdict;
  return (
    <span
      className="badge bg-[var(--color-caution-soft)] text-[var(--color-caution)]"
      data-testid="evidence-badge"
      title={`The evidence behind this value has aged${verdict ? `; backtest on the new years: ${verdict}` : ''}. Open the version for the monitoring.`}
    >
      {text}
      {verdict ? ` · backtest ${verdict}` : ''}
    </span>
  );
}
