import Papa from 'papaparse';

/**
 * What a spreadsheet could make of a CSV file, for the formula-injection tests: every cell when the
 * file is split at commas, semicolons or tabs (the list separator differs by locale), by an RFC 4180
 * parser (papaparse) and by a reader that ignores quotes, and when lines are split at any line break.
 */
export function cellsAsASpreadsheetMightSeeThem(csv: string): string[] {
  const text = csv.replace(/^\uFEFF/, '');
  const cells: string[] = [];
  for (const delimiter of [',', ';', '\t']) {
    for (const row of Papa.parse<string[]>(text, { delimiter, newline: '\r\n' }).data) cells.push(...row);
    // A quote character that never occurs: quotes are ignored.
    for (const row of Papa.parse<string[]>(text, { delimiter, newline: '\r\n', quoteChar: '\u0000' }).data) cells.push(...row);
  }
  for (const line of text.split(/\r\n|\r|\n/)) cells.push(...line.split(/[,;\t]/));
  return cells;
}

// A cell a spreadsheet would evaluate: = + - @ (or their full-width forms, which some East Asian
// locales convert) as the first character once leading spaces, tabs, line breaks and quotes are
// stripped, as some readers do (OWASP, "CSV Injection", lists tab and CR for that reason). A plain
// number, negative too, is read as a number. Written independently of lib/csv.ts.
const LIVE = /^[\s"]*[=+\-@\uFF1D\uFF0B\uFF0D\uFF20]/;
const NUMBER = /^-?\d+(\.\d+)?(e[+-]?\d+)?$/;

/** The cells of the file that a spreadsheet would evaluate as formulas (none, when the export is safe). */
export function liveCells(csv: string): string[] {
  return cellsAsASpreadsheetMightSeeThem(csv).filter((c) => !NUMBER.test(c) && LIVE.test(c));
}
