/**
 * Calendar arithmetic on ISO dates (YYYY-MM-DD, UTC) for effective and review-by dates.
 */
const ISO = /^(\d{4})-(\d{2})-(\d{2})$/;

export function isIsoDate(s: string): boolean {
  const m = ISO.exec(s);
  if (!m) return false;
  const d = new Date(Date.UTC(+m[1], +m[2] - 1, +m[3]));
  return d.getUTCFullYear() === +m[1] && d.getUTCMonth() === +m[2] - 1 && d.getUTCDate() === +m[3];
}

export function todayIso(now: Date = new Date()): string {
  return now.toISOString().slice(0, 10);
}

/** Adds calendar months; the day is clamped to the end of a shorter month (31 Jan + 1 = 28/29 Feb). */
export function addMonths(iso: string, months: number): string {
  const m = ISO.exec(iso);
  if (!m) throw new RangeError(`Not an ISO date: ${iso}`);
  const y = +m[1];
  const mo = +m[2] - 1 + months;
  const targetY = y + Math.floor(mo / 12);
  const targetM = ((mo % 12) + 12) % 12;
  const last = new Date(Date.UTC(targetY, targetM + 1, 0)).getUTCDate();
  const day = Math.min(+m[3], last);
  return `${String(targetY).padStart(4, '0')}-${String(targetM + 1).padStart(2, '0')}-${String(day).padStart(2, '0')}`;
}

export function addDays(iso: string, days: number): string {
  const d = new Date(`${iso}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + days);
  return d.toISOString().slice(0, 10);
}

/** Whole days from a to b (b - a). */
export function daysBetween(a: string, b: string): number {
  return Math.round((Date.parse(`${b}T00:00:00Z`) - Date.parse(`${a}T00:00:00Z`)) / 86_400_000);
}

/** The review-by rule: default and maximum twelve months after the effective date. */
export const REVIEW_MONTHS_MAX = 12;

export function defaultReviewBy(effectiveDate: string): string {
  return addMonths(effectiveDate, REVIEW_MONTHS_MAX);
}

/** Returns a sentence when the review-by date breaks the rule, else null. */
export function reviewByProblem(effectiveDate: string, reviewBy: string): string | null {
  if (reviewBy <= effectiveDate) return `The review-by date (${reviewBy}) must come after the effective date (${effectiveDate}).`;
  const max = defaultReviewBy(effectiveDate);
  if (reviewBy > max) return `The review-by date may be at most 12 months after the effective date: ${max} at the latest.`;
  return null;
}

/** Expiring soon: the review-by date is within this many days. */
export const EXPIRING_SOON_DAYS = 30;
