/**
 * The one CSV writer of every export in the app (cohort rows, validation reports, the library, the
 * audit trail), so that every file follows the same rules:
 *
 * - RFC 4180 (Shafranovich 2005): fields separated by commas, lines ended by CRLF; a field that
 *   holds a comma, a double quote or a line break is enclosed in double quotes, inner quotes doubled.
 *   Fields holding a semicolon or a tab are quoted too (spreadsheets in many locales split at
 *   those), and so are fields with leading or trailing spaces or a leading `#` (a reader that skips
 *   comment lines must not skip a data row).
 * - Formula injection (OWASP, "CSV Injection"): text that a spreadsheet would evaluate (first
 *   character, after spaces and double quotes, one of `=`, `+`, `-`, `@`, tab or carriage return,
 *   in ASCII or full width) is prefixed with a single quote, which spreadsheets show as text. The
 *   same is done after every comma, semicolon, tab or line break inside a text, because a
 *   spreadsheet set to another separator (or a reader that ignores quotes) starts a cell there.
 *   Numbers are written as numbers: a negative number is not a formula.
 * - Comment lines (`# ...`: provenance and conventions above the header) start with `#` and are
 *   neutralised the same way, so no piece of them becomes a live cell, while readers that skip
 *   comment lines (`comment='#'`) still skip them.
 */

/** A value of a cell: text is neutralised, numbers are written as they are, null is empty. */
export type CsvValue = string | number | boolean | Date | null | undefined | Record<string, unknown> | readonly unknown[];

const STARTERS = '=+\\-@\\t\\r\\uFF1D\\uFF0B\\uFF0D\\uFF20';
const LEADING_FORMULA = new RegExp(`^[ \\u00a0"]*[${STARTERS}]`);
const FORMULA_AFTER_SEPARATOR = new RegExp(`([,;\\t\\r\\n])(?=[ \\u00a0"]*[${STARTERS}])`, 'g');

/**
 * True when a spreadsheet could read the text as a formula: its first character after spaces and
 * double quotes is = + - @, a tab or a carriage return (or the full-width = + - @).
 */
export function looksLikeFormula(text: string): boolean {
  return LEADING_FORMULA.test(text);
}

/** The text with a single quote before every place a spreadsheet could start a formula cell. */
export function neutralise(text: string): string {
  const inner = text.replace(FORMULA_AFTER_SEPARATOR, "$1'");
  return looksLikeFormula(inner) ? `'${inner}` : inner;
}

function quoteIfNeeded(text: string): string {
  const needs = /[",;\t\r\n]/.test(text) || text !== text.trim() || text.startsWith('#');
  return needs ? `"${text.replace(/"/g, '""')}"` : text;
}

/** One text cell: neutralised against formulas, then quoted when needed. */
export function textCell(text: string): string {
  return quoteIfNeeded(neutralise(text));
}

/** One cell of any value. Throws a RangeError for a number that is not finite (an export never hides one). */
export function csvCell(value: CsvValue): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw new RangeError(`A CSV export met the number ${value}; only finite numbers can be written.`);
    return String(value);
  }
  if (typeof value === 'boolean') return value ? 'true' : 'false';
  if (value instanceof Date) return value.toISOString();
  if (typeof value === 'object') return textCell(JSON.stringify(value));
  return textCell(value);
}

/** The lines of a comment: `# ` + each line of the text, neutralised (no piece of it is a live cell). */
export function commentLines(comment: string): string[] {
  return comment.split(/\r\n|\r|\n/).map((line) => `# ${neutralise(line)}`);
}

export type CsvOptions = {
  /** Written above the header as `# ` lines (one per line of each comment). */
  comments?: readonly string[];
  /** Starts the file with a UTF-8 byte order mark, for spreadsheets that guess the encoding. */
  bom?: boolean;
};

/** A whole CSV file: comment lines, the header, the rows; CRLF after every line. */
export function toCsv(header: readonly string[], rows: Iterable<readonly CsvValue[]>, options: CsvOptions = {}): string {
  const out: string[] = [];
  for (const c of options.comments ?? []) out.push(...commentLines(c));
  out.push(header.map(textCell).join(','));
  for (const r of rows) out.push(r.map(csvCell).join(','));
  return (options.bom ? '\uFEFF' : '') + out.join('\r\n') + '\r\n';
}
