/**
 * Strict ISO calendar dates (YYYY-MM-DD) as integers yyyymmdd, which compare like the dates.
 * Parsing is hand-written because a loan tape has millions of them.
 */

export const DATE_MIN_YEAR = 1900;
export const DATE_MAX_YEAR = 2199;

/** Not written YYYY-MM-DD with digits. */
export const DATE_BAD_FORMAT = -1;
/** Written correctly but not a day of the calendar (2019-02-29, 2020-04-31, 2020-13-01). */
export const DATE_NOT_IN_CALENDAR = -2;
/** Outside DATE_MIN_YEAR..DATE_MAX_YEAR. */
export const DATE_OUT_OF_RANGE = -3;

export function isLeapYear(y: number): boolean {
  return (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
}

const DAYS = [0, 31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

export function daysInMonth(y: number, m: number): number {
  return m === 2 && isLeapYear(y) ? 29 : DAYS[m];
}

function digit(s: string, i: number): number {
  const c = s.charCodeAt(i) - 48;
  return c >= 0 && c <= 9 ? c : -100000;
}

/**
 * Parses YYYY-MM-DD to yyyymmdd, or returns DATE_BAD_FORMAT / DATE_NOT_IN_CALENDAR /
 * DATE_OUT_OF_RANGE.
 *
 * @example parseIsoDate('2016-02-29') // 20160229
 * @example parseIsoDate('2015-02-29') // DATE_NOT_IN_CALENDAR
 * @example parseIsoDate('29/02/2016') // DATE_BAD_FORMAT
 */
export function parseIsoDate(s: string): number {
  if (s.length !== 10 || s.charCodeAt(4) !== 45 || s.charCodeAt(7) !== 45) return DATE_BAD_FORMAT;
  const y = digit(s, 0) * 1000 + digit(s, 1) * 100 + digit(s, 2) * 10 + digit(s, 3);
  const m = digit(s, 5) * 10 + digit(s, 6);
  const d = digit(s, 8) * 10 + digit(s, 9);
  if (y < 0 || m < 0 || d < 0) return DATE_BAD_FORMAT;
  if (m < 1 || m > 12 || d < 1 || d > daysInMonth(y, m)) return DATE_NOT_IN_CALENDAR;
  if (y < DATE_MIN_YEAR || y > DATE_MAX_YEAR) return DATE_OUT_OF_RANGE;
  return y * 10000 + m * 100 + d;
}

export function formatDate(ymd: number): string {
  const y = Math.floor(ymd / 10000);
  const m = Math.floor(ymd / 100) % 100;
  const d = ymd % 100;
  return `${String(y).padStart(4, '0')}-${String(m).padStart(2, '0')}-${String(d).padStart(2, '0')}`;
}

/** The day after a yyyymmdd date. */
export function nextDay(ymd: number): number {
  let y = Math.floor(ymd / 10000);
  let m = Math.floor(ymd / 100) % 100;
  let d = (ymd % 100) + 1;
  if (d > daysInMonth(y, m)) {
    d = 1;
    m++;
    if (m > 12) {
      m = 1;
      y++;
    }
  }
  return y * 10000 + m * 100 + d;
}

/** The day before a yyyymmdd date. */
export function previousDay(ymd: number): number {
  let y = Math.floor(ymd / 10000);
  let m = Math.floor(ymd / 100) % 100;
  let d = (ymd % 100) - 1;
  if (d < 1) {
    m--;
    if (m < 1) {
      m = 12;
      y--;
    }
    d = daysInMonth(y, m);
  }
  return y * 10000 + m * 100 + d;
}
