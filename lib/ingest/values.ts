/**
 * Cell-level parsing shared by the upload kinds: counts, segment names and free text.
 *
 * Counts are non-negative whole numbers written with digits only. Anything else is classified so
 * the message can say what went wrong: a negative number, decimals (including a decimal comma in a
 * semicolon file), thousands separators, a rate or percentage given instead of a count, or text.
 */
import { looksLikeFormula } from '@/lib/csv';
import type { Delimiter } from './csv-reader';
import { FindingCollector } from './findings';
import { MAX_SEGMENT_CHARS, MAX_TEXT_CHARS } from './limits';

export type CountResult = { ok: true; value: number } | { ok: false; rule: string; message: string };

const DIGITS = /^\d+$/;

/**
 * Parses a count cell. `what` names the count in messages ("defaults"), `delimiter` tells a
 * decimal comma from a thousands separator.
 *
 * - "12" -> 12; " 12 " -> 12 (surrounding spaces are ignored)
 * - "" -> missing-value; "-3" -> negative-count; "12.5", "12,5" (semicolon file) -> non-integer-count
 * - "0.025", "0,025", "2.5%" -> rate-instead-of-count
 * - "1,234" (quoted, comma file), "1.234" (semicolon file), "1 234" -> thousands-separator
 * - "n/a", "1e3" -> not-a-number; beyond 2^53 - 1 -> count-too-large
 */
export function parseCount(raw: string, what: string, delimiter: Delimiter): CountResult {
  const s = raw.length > 0 && (raw.charCodeAt(0) <= 32 || raw.charCodeAt(raw.length - 1) <= 32) ? raw.trim() : raw;
  if (DIGITS.test(s)) {
    const value = Number(s);
    if (!Number.isSafeInteger(value)) {
      return { ok: false, rule: 'count-too-large', message: `The ${what} count ${s} is too large to be a count of loans. Check the column.` };
    }
    return { ok: true, value };
  }
  if (s === '') {
    return { ok: false, rule: 'missing-value', message: `The ${what} count is empty. Give a whole number (write 0 when there are none).` };
  }
  if (/^[+-]?\d+([.,]\d+)?\s*%$/.test(s)) {
    return {
      ok: false,
      rule: 'rate-instead-of-count',
      message: `"${s}" is a percentage, but ${what} must be a count. Give the number of ${what} as a whole number, not a rate.`,
    };
  }
  if (/^-\s*\d+([.,]\d+)?$/.test(s)) {
    return { ok: false, rule: 'negative-count', message: `The ${what} count is negative (${s}). Counts cannot be below 0; correct the value.` };
  }
  const groupedBySpace = /^\d{1,3}([ \u00a0\u202f']\d{3})+$/.test(s);
  const groupedByComma = delimiter === ',' && /^\d{1,3}(,\d{3})+$/.test(s);
  const groupedByDot = delimiter === ';' && /^\d{1,3}(\.\d{3})+$/.test(s);
  if (groupedBySpace || groupedByComma || groupedByDot) {
    return {
      ok: false,
      rule: 'thousands-separator',
      message: `"${s}" uses a thousands separator. Write counts with digits only (${s.replace(/[^\d]/g, '')}).`,
    };
  }
  const decimal = /^(\d+)([.,])(\d+)$/.exec(s);
  if (decimal) {
    if (Number(decimal[1]) === 0) {
      return {
        ok: false,
        rule: 'rate-instead-of-count',
        message: `"${s}" is below 1 with decimals, which looks like a rate, but ${what} must be a count. Give the number of ${what} as a whole number.`,
      };
    }
    const comma = decimal[2] === ',';
    return {
      ok: false,
      rule: 'non-integer-count',
      message: comma
        ? `"${s}" has a decimal comma, but ${what} must be a whole number. Give the count without decimals (a rate multiplied back to a count must be rounded by you, not by Rhobook).`
        : `"${s}" has decimals, but ${what} must be a whole number. Give the count without decimals.`,
    };
  }
  return {
    ok: false,
    rule: 'not-a-number',
    message: `"${s}" is not a number. The ${what} column must hold whole numbers written with digits only.`,
  };
}

/** Reports a failed count and returns null, or returns the value. */
export function countOrReport(
  raw: string,
  what: string,
  column: string,
  line: number,
  delimiter: Delimiter,
  findings: FindingCollector,
): number | null {
  const r = parseCount(raw, what, delimiter);
  if (r.ok) return r.value;
  findings.error(r.rule, line, column, raw, r.message);
  return null;
}


/**
 * Checks a segment name. Returns the trimmed name, or null when it is unusable (empty, too long).
 * A name that looks like a spreadsheet formula is a warning: it is kept, and neutralised on export.
 */
export function checkSegment(raw: string, line: number, findings: FindingCollector, reportFormula: boolean): string | null {
  const s = raw.length > 0 && (raw.charCodeAt(0) <= 32 || raw.charCodeAt(raw.length - 1) <= 32) ? raw.trim() : raw;
  if (s === '') {
    findings.error('empty-segment', line, 'segment', raw, 'The segment is empty. Give every row the name of its portfolio segment.');
    return null;
  }
  if (s.length > MAX_SEGMENT_CHARS) {
    findings.error(
      'segment-too-long',
      line,
      'segment',
      s,
      `The segment name has ${s.length} characters; the limit is ${MAX_SEGMENT_CHARS}. Use a shorter name.`,
    );
    return null;
  }
  if (reportFormula && looksLikeFormula(s)) {
    findings.warning(
      'formula-like-text',
      line,
      'segment',
      s,
      `The segment name "${s}" starts with ${JSON.stringify(s[0])}, which spreadsheets read as a formula. It is kept as text and prefixed with ' in every CSV export; rename the segment if that is not intended.`,
    );
  }
  return s;
}

/** Checks an optional free-text cell (note, default definition). Returns the trimmed text or undefined when empty; null when unusable. */
export function checkText(raw: string | undefined, column: string, line: number, findings: FindingCollector): string | undefined | null {
  if (raw === undefined) return undefined;
  const s = raw.trim();
  if (s === '') return undefined;
  if (s.length > MAX_TEXT_CHARS) {
    findings.error('text-too-long', line, column, s, `The ${column} has ${s.length} characters; the limit is ${MAX_TEXT_CHARS}. Shorten it.`);
    return null;
  }
  if (looksLikeFormula(s)) {
    findings.warning(
      'formula-like-text',
      line,
      column,
      s,
      `The ${column} starts with ${JSON.stringify(s[0])}, which spreadsheets read as a formula. It is kept as text and prefixed with ' in every CSV export.`,
    );
  }
  return s;
}

/**
 * The segment names of a file's rows, checked row by row (checkSegment); a name that looks like a
 * formula is reported on the first row that has it, not on every row.
 */
export class SegmentNames {
  private readonly seen = new Set<string>();

  constructor(private readonly findings: FindingCollector) {}

  /** The row's segment name, or null when it is unusable (reported). */
  check(raw: string, line: number): string | null {
    const segment = checkSegment(raw, line, this.findings, !this.seen.has(raw.trim()));
    if (segment !== null) this.seen.add(segment);
    return segment;
  }
}
