/**
 * CSV exports of validation reports and cohort rows.
 *
 * Every cell that came from a file is neutralised against spreadsheet formula injection: a cell
 * starting with = + - @ (or a tab or carriage return) is prefixed with a single quote, as OWASP
 * recommends for CSV injection. Cells are quoted when they contain a comma, a double quote or a
 * line break (RFC 4180), with inner double quotes doubled. Lines end with CRLF (RFC 4180).
 */
import type { Finding } from './findings';
import { looksLikeFormula } from './values';

/** Neutralises a text cell that a spreadsheet would read as a formula. */
export function neutraliseCell(text: string): string {
  return looksLikeFormula(text) ? "'" + text : text;
}

/** Quotes a cell for CSV when needed (RFC 4180). */
export function quoteCell(text: string): string {
  return /[",\r\n]/.test(text) ? '"' + text.replace(/"/g, '""') + '"' : text;
}

/** A text cell from user data: neutralised, then quoted. */
export function textCell(text: string | null | undefined): string {
  return text === null || text === undefined ? '' : quoteCell(neutraliseCell(text));
}

function numberCell(n: number | null): string {
  return n === null ? '' : String(n);
}

export const FINDINGS_CSV_HEADER = 'line,column,rule,severity,value,message';

/** A validation report as CSV: one finding per row, in the order given. */
export function findingsToCsv(findings: readonly Finding[]): string {
  const out = [FINDINGS_CSV_HEADER];
  for (const f of findings) {
    out.push([numberCell(f.line), textCell(f.column), textCell(f.rule), f.severity, textCell(f.value), textCell(f.message)].join(','));
  }
  return out.join('\r\n') + '\r\n';
}

export const COHORT_CSV_HEADER = 'segment,period,obligors,defaults';

/**
 * Cohort rows as `segment,period,obligors,defaults`. `comments` (conventions, censored list) are
 * written first as lines starting with "# " so that a reader can check a conversion by hand; pass
 * none for a plain file.
 */
export function cohortRowsToCsv(
  rows: readonly { segment: string; period: string; obligors: number; defaults: number }[],
  comments: readonly string[] = [],
): string {
  const out: string[] = [];
  for (const c of comments) for (const line of c.split(/\r\n|\r|\n/)) out.push('# ' + line);
  out.push(COHORT_CSV_HEADER);
  for (const r of rows) out.push([textCell(r.segment), textCell(r.period), String(r.obligors), String(r.defaults)].join(','));
  return out.join('\r\n') + '\r\n';
}
