import type { AssumptionStatus, OverduePolicy } from '@/db/schema';

/**
 * Which version of a segment's assumption was in force on a date: the rule of the consumer API
 * (`GET /api/v1/assumptions?segment=&asOf=`), as a pure function that the data access layer's query
 * matches (tests/integration/assumptions/in-force.test.ts compares them on random histories).
 *
 * The supersession chain decides, by publication time, not by effective date: a version is in force
 * from the moment it is published until the moment it ends (superseded by the next publication,
 * retired, or expired by the scheduler). The answer for a date D is the state at the end of D (UTC),
 * or now when D is today or later, so an answer for a past date reads only publications and endings
 * that had happened by then, and never changes afterwards. An effective date cannot come before the
 * approval date and publication never comes before the effective date, so the two agree under the
 * rules; where stored data disagrees (a version back-dated before those rules), publication time wins.
 *
 * A version in force whose review-by date is before D is overdue on D. What that means is the
 * institution's overdue policy in force at the cutoff (lib/assumptions/overdue-policy.ts): under
 * `flag` it stays in force, flagged overdue; under `withdraw` it is not in force (a projection for a
 * future date says so before the scheduler has expired it). The policy's changes are kept with
 * their times, so an answer for a past date reads the policy of then and never changes.
 */
export type PublishedRecord = {
  version: number;
  status: AssumptionStatus;
  reviewBy: string;
  publishedAt: Date | null;
  endedAt: Date | null;
};

export type InForce<V extends PublishedRecord> =
  /** overdue: its review-by date is before the asked date (only under the flag policy). */
  | { kind: 'in-force'; version: V; overdue: boolean }
  /** Nothing had been published by then. */
  | { kind: 'none' }
  /** The version in force was past its review-by date on that day under the withdraw policy (or the scheduler had expired it). */
  | { kind: 'expired'; version: V }
  /** The last published version had been retired by then. */
  | { kind: 'retired'; version: V; on: string }
  /** The last published version had ended otherwise (superseded by a version that ended too). */
  | { kind: 'ended'; version: V; on: string };

/** The instant whose state answers for `asOf`: the end of that day (UTC), or `now` if earlier. */
export function inForceCutoff(asOf: string, now: Date): Date {
  const endOfDay = Date.parse(`${asOf}T23:59:59.999Z`);
  if (Number.isNaN(endOfDay)) throw new RangeError(`Not an ISO date: ${asOf}. Give the date as YYYY-MM-DD.`);
  return new Date(Math.min(endOfDay, now.getTime()));
}

/** The last version published at or before `cutoff` (ties: the higher version number), or null. */
export function lastPublishedBy<V extends PublishedRecord>(versions: readonly V[], cutoff: Date): V | null {
  let best: V | null = null;
  for (const v of versions) {
    if (!v.publishedAt || v.publishedAt.getTime() > cutoff.getTime()) continue;
    if (
      !best ||
      v.publishedAt.getTime() > best.publishedAt!.getTime() ||
      (v.publishedAt.getTime() === best.publishedAt!.getTime() && v.version > best.version)
    ) {
      best = v;
    }
  }
  return best;
}

/**
 * Decides what was in force on `asOf` from the last version published by the cutoff, under the
 * overdue policy in force at the cutoff.
 */
export function judgeInForce<V extends PublishedRecord>(last: V | null, asOf: string, cutoff: Date, policy: OverduePolicy = 'withdraw'): InForce<V> {
  if (!last) return { kind: 'none' };
  if (last.endedAt && last.endedAt.getTime() <= cutoff.getTime()) {
    const on = last.endedAt.toISOString().slice(0, 10);
    if (last.status === 'retired') return { kind: 'retired', version: last, on };
    if (last.status === 'expired') return { kind: 'expired', version: last };
    return { kind: 'ended', version: last, on };
  }
  if (last.reviewBy < asOf) return policy === 'withdraw' ? { kind: 'expired', version: last } : { kind: 'in-force', version: last, overdue: true };
  return { kind: 'in-force', version: last, overdue: false };
}

/**
 * The version of one segment in force on `asOf`, seen at `now` (see the file comment), under the
 * overdue policy in force at the cutoff (`policyAt`; by default the withdraw rule).
 */
export function versionInForceAt<V extends PublishedRecord>(
  versions: readonly V[],
  asOf: string,
  now: Date,
  policyAt: (t: Date) => OverduePolicy = () => 'withdraw',
): InForce<V> {
  const cutoff = inForceCutoff(asOf, now);
  return judgeInForce(lastPublishedBy(versions, cutoff), asOf, cutoff, policyAt(cutoff));
}
