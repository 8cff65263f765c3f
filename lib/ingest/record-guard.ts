/**
 * Bounds what one record of a CSV file may cost before the parser sees it. A record is one line,
 * or several held together by a quoted value; the parser (papaparse) re-reads a record from its
 * start at every chunk until the record ends, so one 90 MB line, or a quote never closed in the
 * second line of a 90 MB file, costs time that grows with the square of its length and memory
 * many times its size. The guard reads the text as it streams and trips:
 *
 * - `line-too-long` as soon as a record passes `maxLineChars` characters, naming the line where it
 *   starts;
 * - `too-many-columns` as soon as the header (the first record that is not blank) has more than
 *   `maxColumns` columns, naming its line.
 *
 * It ends records where papaparse ends them (papaparse 5, quote and escape character `"`), so that
 * the two agree (tests/unit/ingest/record-guard.test.ts holds it against papaparse itself):
 * - the delimiter is chosen from the first line as csv-reader.ts chooses it (more semicolons than
 *   commas: semicolon), so the first line is held until it is complete (at most maxLineChars);
 * - a double quote opens a quoted value only as the first character of a field;
 * - inside one, `""` is a literal quote, and a quote closes the value only when it is followed by
 *   blanks and then the delimiter or a line break (or by the end of the file); any other quote is
 *   a literal character and the value goes on.
 * Text comes with line breaks already normalised to LF. Cost: an indexOf pass over text without
 * quotes, one character pass over quoted values and the header.
 */

export type GuardTrip = {
  rule: 'line-too-long' | 'too-many-columns';
  /** physical line where the offending record starts (1 = the file's first line) */
  line: number;
  /** the record runs over more than one line (a quoted value) */
  multiLine: boolean;
};

const LF = 10;
const QUOTE = 34;
const COMMA = 44;
const SEMICOLON = 59;

/** Blanks papaparse allows between a closing quote and what follows it (what String.trim removes, line breaks aside). */
function isBlank(c: number): boolean {
  return c === 32 || c === 9 || c === 11 || c === 12 || c === 13 || c === 0xa0 || c === 0xfeff || c === 0x1680 || (c >= 0x2000 && c <= 0x200a) || c === 0x2028 || c === 0x2029 || c === 0x202f || c === 0x205f || c === 0x3000;
}

export class RecordGuard {
  trip: GuardTrip | null = null;
  /** the first line, held until it is complete so that the delimiter is known */
  private held = '';
  private delimiter = -1;
  /** physical line of the next character */
  private line = 1;
  private recordStartLine = 1;
  private recordChars = 0;
  private inQuotes = false;
  /**
   * Inside a quoted value, the characters seen since a quote that may close it: -1 when there is
   * no such quote, 0 right after it, n after n blanks.
   */
  private afterQuote = -1;
  private fieldStart = true;
  private headerDone = false;
  private headerHasContent = false;
  private fields = 1;

  constructor(
    private readonly maxLineChars: number,
    private readonly maxColumns: number,
  ) {}

  /**
   * Reads the next piece. Returns -1 when it keeps the limits; otherwise sets `trip` and returns
   * the index in this piece where the offending record starts (0 when it started in an earlier
   * piece): the text before it holds only whole records.
   */
  scan(text: string): number {
    if (this.trip) return 0;
    if (this.delimiter === -1) {
      const nl = text.indexOf('\n');
      if (nl === -1) {
        this.held += text;
        if (this.held.length > this.maxLineChars) return this.tripHeld();
        return -1;
      }
      this.held += text.slice(0, nl + 1);
      this.delimiter = countOf(this.held, ';') > countOf(this.held, ',') ? SEMICOLON : COMMA;
      const first = this.held;
      this.held = '';
      // The held first line was emitted already, piece by piece: a trip in it cuts at 0.
      if (this.read(first, 0) !== -1) return 0;
      return this.read(text, nl + 1) === -1 ? -1 : this.cutFor(nl + 1);
    }
    const r = this.read(text, 0);
    return r === -1 ? -1 : this.cutFor(0);
  }

  /**
   * At the end of the input: reads a first line that never ended (a file of one line). Returns
   * true when it trips (`trip` is set).
   */
  finish(): boolean {
    if (this.trip || this.delimiter !== -1) return this.trip !== null;
    this.delimiter = countOf(this.held, ';') > countOf(this.held, ',') ? SEMICOLON : COMMA;
    const first = this.held;
    this.held = '';
    return this.read(first, 0) !== -1;
  }

  /** Where to cut a piece whose reading from `from` tripped: where the record started in it. */
  private cut = 0;
  private cutFor(from: number): number {
    return Math.max(from, this.cut);
  }

  /**
   * A first line still held when it passed the length limit: read with the delimiter its part so
   * far shows, so that the limit it passes first is the one named.
   */
  private tripHeld(): number {
    this.delimiter = countOf(this.held, ';') > countOf(this.held, ',') ? SEMICOLON : COMMA;
    const first = this.held;
    this.held = '';
    this.read(first, 0);
    return 0;
  }

  /** Reads text[from..]; returns -1, or 0 after setting `trip` and `cut`. */
  private read(text: string, from: number): number {
    const n = text.length;
    const delim = this.delimiter;
    let i = from;
    let recordStart = from;
    while (i < n) {
      if (this.headerDone && !this.inQuotes) {
        // Fast path: up to the next quote, records end at each line break.
        const q = text.indexOf('"', i);
        const end = q === -1 ? n : q;
        let nl = text.indexOf('\n', i);
        while (nl !== -1 && nl < end) {
          if (this.recordChars + (nl - i) > this.maxLineChars) return this.tripAt('line-too-long', recordStart);
          i = nl + 1;
          this.endRecord();
          recordStart = i;
          nl = text.indexOf('\n', i);
        }
        this.recordChars += end - i;
        if (this.recordChars > this.maxLineChars) return this.tripAt('line-too-long', recordStart);
        if (end > i) this.fieldStart = text.charCodeAt(end - 1) === delim;
        i = end;
        if (q === -1) break;
      }
      const c = text.charCodeAt(i);
      if (this.inQuotes) {
        if (this.afterQuote >= 0) {
          if (c === QUOTE && this.afterQuote === 0) {
            this.afterQuote = -1; // "" is a literal quote
            this.headerHasContent = true;
          } else if (isBlank(c)) {
            this.afterQuote++;
          } else if (c === delim || c === LF) {
            this.inQuotes = false; // closed: the character is read again outside the value
            this.afterQuote = -1;
            continue;
          } else {
            this.headerHasContent = true; // the quote was a literal one; this one may close
            this.afterQuote = c === QUOTE ? 0 : -1;
          }
        } else if (c === QUOTE) {
          this.afterQuote = 0;
        }
        if (c === LF) this.line++;
        else if (c !== QUOTE && !isBlank(c)) this.headerHasContent = true;
      } else if (c === LF) {
        this.endRecord();
        recordStart = i + 1;
        i++;
        continue;
      } else if (c === QUOTE && this.fieldStart) {
        this.inQuotes = true;
        this.fieldStart = false;
      } else {
        this.fieldStart = c === delim;
        if (!this.headerDone) {
          if (!isBlank(c)) this.headerHasContent = true;
          if (c === delim && ++this.fields > this.maxColumns) return this.tripAt('too-many-columns', recordStart);
        }
      }
      this.recordChars++;
      if (this.recordChars > this.maxLineChars) return this.tripAt('line-too-long', recordStart);
      i++;
    }
    return -1;
  }

  private endRecord(): void {
    if (!this.headerDone && this.headerHasContent) this.headerDone = true;
    this.fields = 1;
    this.line++;
    this.recordStartLine = this.line;
    this.recordChars = 0;
    this.fieldStart = true;
  }

  private tripAt(rule: GuardTrip['rule'], recordStart: number): number {
    this.trip = { rule, line: this.recordStartLine, multiLine: this.line > this.recordStartLine };
    this.cut = recordStart;
    return 0;
  }
}

function countOf(text: string, ch: string): number {
  let n = 0;
  for (let i = text.indexOf(ch); i !== -1; i = text.indexOf(ch, i + 1)) n++;
  return n;
}
