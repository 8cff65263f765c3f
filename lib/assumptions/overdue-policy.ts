import type { OverduePolicy } from '@/db/schema';

/**
 * What happens to a published value past its review-by date, by the institution's choice (an
 * administrator's setting): `flag` (the default, what most institutions' policies ask) keeps it
 * readable in the consumer API, flagged overdue, until a new version is published or it is
 * retired; `withdraw` stops serving it (the scheduler expires it the day after its review-by date).
 * Either way an escalation e-mail goes to the validators and administrators.
 */
export const DEFAULT_OVERDUE_POLICY: OverduePolicy = 'flag';

export const overduePolicyLabels: Record<OverduePolicy, string> = {
  flag: 'keep the value readable, flagged overdue',
  withdraw: 'withdraw the value (no longer served)',
};

/** The policy in force at `t`: the last change at or before it, or the default. */
export function overduePolicyAt(changes: readonly { policy: OverduePolicy; at: Date }[], t: Date): OverduePolicy {
  let best: { policy: OverduePolicy; at: Date } | null = null;
  for (const c of changes) if (c.at.getTime() <= t.getTime() && (!best || c.at.getTime() >= best.at.getTime())) best = c;
  return best?.policy ?? DEFAULT_OVERDUE_POLICY;
}

/** The caution an overdue value carries while it stays readable. */
export function overdueCaution(reviewBy: string): string {
  return `This value is past its review-by date (${reviewBy}): it stays readable under the institution's policy, flagged overdue, until a reviewed version replaces it. Use it only as the policy allows.`;
}
