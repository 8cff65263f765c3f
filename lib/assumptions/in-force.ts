import type { AssumptionStatus } from '@/db/schema';

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
 * A version in force whose review-by date is before D is not in force on D (a projection for a
 * future date says so before the scheduler has expired it).
 */
export type PublishedRecord = {
  version: number;
  status: AssumptionStatus;
  reviewBy: string;
  publishedAt: Date | null;
  endedAt: Date | null;
};

export type InForce<V extends PublishedRecord> =
  | { kind: 'in-force'; version: V }
  /** Nothing had been published by then. */
  | { kind: 'none' }
  /** The version in force was past its review-by date on that day (or the scheduler had expired it). */
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

/** Decides what was in force on `asOf` from the last version published by the cutoff. */
export function judgeInForce<V extends PublishedRecord>(last: V | null, asOf: string, cutoff: Date): InForce<V> {
  if (!last) return { kind: 'none' };
  if (last.endedAt && last.endedAt.getTime() <= cutoff.getTime()) {
    const on = last.endedAt.toISOString().slice(0, 10);
    if (last.status === 'retired') return { kind: 'retired', version: last, on };
    if (last.status === 'expired') return { kind: 'expired', version: last };
    return { kind: 'ended', version: last, on };
  }
  if (last.reviewBy < asOf) return { kind: 'expired', version: last };
  return { kind: 'in-force', version: last };
}

/** The version of one segment in force on `asOf`, seen at `now` (see the file comment). */
export function versionInForceAt<V extends PublishedRecord>(versions: readonly V[], asOf: string, now: Date): InForce<V> {
  const cutoff = inForceCutoff(asOf, now);
  return judgeInForce(lastPublishedBy(versions, cutoff), asOf, cutoff);
}
