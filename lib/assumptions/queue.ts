import type { AssumptionStatus, Role } from '@/db/schema';

/**
 * Why a version awaits a person, or null: the queue's rule for every kind of value (a segment's
 * version, a matrix's). Validators see a submitted version they did not draft or edit, and one in
 * review by them; analysts see their own draft sent back with changes requested. Approved versions
 * need no one: the scheduler publishes them on their effective date. The two lookups are asked only
 * when the rule needs them (each is a query in the DAL).
 *
 * @example await queueReason({ status: 'submitted', decisionComment: null }, 'validator', false, ...) // 'Submitted: awaiting review'
 */
export async function queueReason(
  v: { status: AssumptionStatus; decisionComment: string | null },
  role: Role,
  isMaker: boolean,
  reviewingIt: () => Promise<boolean>,
  lastAction: () => Promise<string | null>,
): Promise<string | null> {
  if (role === 'validator') {
    if (isMaker) return null;
    if (v.status === 'submitted') return 'Submitted: awaiting review';
    if (v.status === 'in_review' && (await reviewingIt())) return 'In review by you: decide';
    return null;
  }
  if (role === 'analyst' && isMaker && v.status === 'draft' && (await lastAction()) === 'request-changes') {
    return `Changes requested: ${v.decisionComment ?? 'see the comment'}`;
  }
  return null;
}
