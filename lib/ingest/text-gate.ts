/**
 * Checks decoded text piece by piece before it is parsed: NUL characters, line endings (normalised
 * to LF, a mixture reported once), whether any quote has been seen, and the record limits of
 * record-guard.ts (a record too long, a header too wide). Part of csv-reader.ts's reading.
 */
import type { FindingCollector } from './findings';
import { RecordGuard } from './record-guard';

export type LineEnding = 'crlf' | 'lf' | 'cr';

export function countChar(text: string, ch: string): number {
  let n = 0;
  let i = text.indexOf(ch);
  while (i !== -1) {
    n++;
    i = text.indexOf(ch, i + 1);
  }
  return n;
}

export function countOccurrences(text: string, needle: string): number {
  let n = 0;
  let i = text.indexOf(needle);
  while (i !== -1) {
    n++;
    i = text.indexOf(needle, i + needle.length);
  }
  return n;
}

/** Line breaks in raw (not yet normalised) text: CRLF, CR and LF each count once. */
export function countLineBreaks(text: string): number {
  return countChar(text, '\n') + countChar(text, '\r') - countOccurrences(text, '\r\n');
}

/**
 * Checks decoded text piece by piece: NUL characters, line endings (normalised to LF, mixture
 * reported once), whether any quote has been seen (rows can only span lines when it has).
 */
export class TextGate {
  /** '\n' characters emitted so far (after normalisation) */
  newlines = 0;
  sawQuote = false;
  stopped = false;
  /** characters emitted so far, and whether the last one was a line break */
  emitted = 0;
  endsWithNewline = false;
  readonly endings = new Set<LineEnding>();
  private firstEnding: LineEnding | null = null;
  private mixedReported = false;
  private heldCR = false;
  private readonly guard: RecordGuard;
  /** the line where the record guard stopped the reading: rows from there on are not whole */
  cutLine: number | null = null;

  constructor(
    private readonly findings: FindingCollector,
    private readonly maxLineChars: number,
    private readonly maxColumns: number,
  ) {
    this.guard = new RecordGuard(maxLineChars, maxColumns);
  }

  /** Returns the normalised text to parse, or null when reading must stop. */
  push(piece: string): string | null {
    if (this.stopped) return null;
    if (this.heldCR) {
      piece = '\r' + piece;
      this.heldCR = false;
    }
    if (piece.length > 0 && piece.charCodeAt(piece.length - 1) === 13) {
      // A CR at the end of a piece may be the first half of a CRLF split across pieces.
      this.heldCR = true;
      piece = piece.slice(0, -1);
    }
    const nul = piece.indexOf('\u0000');
    if (nul !== -1) {
      const line = this.newlines + 1 + countLineBreaks(piece.slice(0, nul));
      this.findings.error(
        'binary-content',
        line,
        null,
        null,
        'The file contains NUL bytes, so it is not a text CSV file (perhaps a spreadsheet or other binary file renamed to .csv). Export the data as CSV (UTF-8) and upload that.',
      );
      this.stopped = true;
      return null;
    }
    if (!this.sawQuote && piece.indexOf('"') !== -1) this.sawQuote = true;
    let text = piece;
    if (piece.indexOf('\r') !== -1) {
      this.noteEndings(piece);
      text = piece.replace(/\r\n?/g, '\n');
    } else if (piece.indexOf('\n') !== -1) {
      this.noteEnding('lf', piece, piece.indexOf('\n'));
    }
    const cut = this.guard.scan(text);
    if (cut !== -1) {
      text = text.slice(0, cut);
      this.tooLong();
    }
    this.newlines += countChar(text, '\n');
    this.track(text);
    return text;
  }

  /** Reports what the record guard tripped on and stops the reading. */
  private tooLong(): void {
    const { rule, line, multiLine } = this.guard.trip!;
    this.stopped = true;
    this.cutLine = line;
    const columns = rule === 'too-many-columns';
    const max = (columns ? this.maxColumns : this.maxLineChars).toLocaleString('en');
    const message = columns
      ? `The header (line ${line}) has more than ${max} columns, so it is not the header of a cohort, vintage or loan-level file. Check that this is the right file; if a spreadsheet added empty columns at the end, delete them and save the file again.`
      : multiLine
        ? `The row that starts on line ${line} runs over several lines and is longer than ${max} characters: a double quote in it is probably never closed. Close the quoted value (a double quote inside one is written twice: "") and upload the file again.`
        : `Line ${line} is longer than ${max} characters, far longer than any row of a cohort, vintage or loan-level file: the file's line breaks may have been lost, or it is not a CSV file of these kinds. Check the file and upload it again.`;
    this.findings.error(rule, line, null, `more than ${max} ${columns ? 'columns' : 'characters'}`, message);
  }

  /** Flushes a held CR at the end of the input, and checks a first line that never ended. */
  finish(): string {
    if (this.stopped) return '';
    let tail = '';
    if (this.heldCR) {
      this.heldCR = false;
      this.noteEnding('cr', '\r', 0);
      tail = '\n';
    }
    if (this.guard.scan(tail) !== -1 || this.guard.finish()) {
      this.tooLong();
      return '';
    }
    this.newlines += tail.length;
    this.track(tail);
    return tail;
  }

  private track(text: string): void {
    if (text.length === 0) return;
    this.emitted += text.length;
    this.endsWithNewline = text.charCodeAt(text.length - 1) === 10;
  }

  /** Physical lines in the text emitted so far. */
  get lines(): number {
    return this.newlines + (this.emitted > 0 && !this.endsWithNewline ? 1 : 0);
  }

  private noteEndings(piece: string): void {
    const crlf = countOccurrences(piece, '\r\n');
    const cr = countChar(piece, '\r') - crlf;
    const lf = countChar(piece, '\n') - crlf;
    const kinds = (crlf > 0 ? 1 : 0) + (cr > 0 ? 1 : 0) + (lf > 0 ? 1 : 0);
    if (kinds === 1 && (this.firstEnding === null || this.endings.has(crlf > 0 ? 'crlf' : cr > 0 ? 'cr' : 'lf'))) {
      const kind: LineEnding = crlf > 0 ? 'crlf' : cr > 0 ? 'cr' : 'lf';
      this.endings.add(kind);
      this.firstEnding ??= kind;
      return;
    }
    // Mixed (within this piece or against earlier pieces): walk the breaks to find where.
    const re = /\r\n|\r|\n/g;
    let m: RegExpExecArray | null;
    while ((m = re.exec(piece)) !== null) {
      const kind: LineEnding = m[0] === '\r\n' ? 'crlf' : m[0] === '\r' ? 'cr' : 'lf';
      this.noteEnding(kind, piece, m.index);
      if (this.mixedReported) break;
    }
    if (crlf > 0) this.endings.add('crlf');
    if (cr > 0) this.endings.add('cr');
    if (lf > 0) this.endings.add('lf');
  }

  private noteEnding(kind: LineEnding, piece: string, index: number): void {
    this.endings.add(kind);
    if (this.firstEnding === null) {
      this.firstEnding = kind;
      return;
    }
    if (kind !== this.firstEnding && !this.mixedReported) {
      this.mixedReported = true;
      const line = this.newlines + 1 + countLineBreaks(piece.slice(0, index));
      const name = { crlf: 'CRLF (Windows)', lf: 'LF (Unix)', cr: 'CR (old Mac)' };
      this.findings.warning(
        'mixed-line-endings',
        line,
        null,
        kind,
        `Line ${line} ends with ${name[kind]} while earlier lines end with ${name[this.firstEnding]}. The file was read correctly, but it may have been pasted together from several sources; check that no rows are missing or duplicated.`,
      );
    }
  }
}
