/**
 * CSV reading shared by the three upload kinds: bytes -> checked UTF-8 text -> papaparse rows ->
 * a kind-specific sink, with the file's physical line number on every row.
 *
 * What this layer guarantees (DESIGN.md, "Data the user brings"):
 * - UTF-8 with or without a byte-order mark; invalid UTF-8, NUL bytes, UTF-16 and ZIP/Excel
 *   content are refused with a finding naming the line.
 * - Comma or semicolon, detected from the header line (the one with more of them wins).
 * - CRLF, LF, lone CR and any mixture are read alike (normalised to LF before parsing); a mixture
 *   is a warning `mixed-line-endings` at the first line whose ending differs.
 * - Physical line numbers (header = 1) stay right when quoted fields contain line breaks: each
 *   row advances the line counter by 1 + the line breaks inside its fields.
 * - Blank lines are skipped (they still count as lines). Rows with fewer fields than the header,
 *   or with extra non-empty fields, are errors and are not passed on; extra empty fields (trailing
 *   delimiters written by spreadsheets) are ignored.
 * - Size: more than `maxBytes` raw bytes is the error `file-too-large`; reading stops there.
 *
 * Streaming: `readCsvStream` pulls the source chunk by chunk and hands papaparse a Node Readable,
 * whose `chunk` callback passes arrays of rows to the sink; nothing here keeps rows, so memory is
 * bounded by the chunk size plus whatever the sink keeps.
 */
import Papa from 'papaparse';
import { Readable } from 'node:stream';
import { FindingCollector } from './findings';
import { DEFAULT_MAX_UPLOAD_BYTES, formatBytes } from './limits';

export type Delimiter = ',' | ';';
export type LineEnding = 'crlf' | 'lf' | 'cr';

/** Receives the header and the data rows of one file. */
export interface CsvSink {
  /**
   * Called once with the header names (trimmed, lower-cased, BOM removed). Return false to stop
   * reading (for example when a required column is missing: every row would fail the same way).
   */
  header(names: string[], line: number, delimiter: Delimiter): boolean;
  /** Called for every non-blank data row whose field count matches the header. */
  row(fields: string[], line: number): void;
}

export interface ReadOptions {
  /** Largest accepted raw size in bytes; default DEFAULT_MAX_UPLOAD_BYTES (100 MB). */
  maxBytes?: number;
  /**
   * Stop after this many data rows (blank lines not counted): for checks of a file's head. The
   * rest of the source is not read, and a partial line where reading stopped is never a row.
   */
  maxDataRows?: number;
}

/** Facts about the file as read, for the report and the stored dataset. */
export interface ReadInfo {
  bytes: number;
  bom: boolean;
  delimiter: Delimiter;
  lineEndings: LineEnding[];
  /** physical lines seen, including the header and blank lines */
  lines: number;
  /** data rows passed to the sink or rejected for their field count (blank lines excluded) */
  dataRows: number;
  /** reading stopped before the end of the file (too large, binary, bad header) */
  stopped: boolean;
}

/** Source of a streamed upload: a Node Readable, a web ReadableStream (in Node) or any async iterable of chunks. */
export type ByteSource = AsyncIterable<Uint8Array | string>;


function countChar(text: string, ch: string): number {
  let n = 0;
  let i = text.indexOf(ch);
  while (i !== -1) {
    n++;
    i = text.indexOf(ch, i + 1);
  }
  return n;
}

/** Line breaks inside a row's fields (the text is normalised to LF before parsing). */
function newlinesInRow(fields: string[]): number {
  let n = 0;
  for (let i = 0; i < fields.length; i++) {
    const f = fields[i];
    if (f.indexOf('\n') !== -1) n += countChar(f, '\n');
  }
  return n;
}

/** Chooses the delimiter from the header line: semicolon when it has more semicolons than commas. */
export function detectDelimiter(headerLine: string): Delimiter {
  return countChar(headerLine, ';') > countChar(headerLine, ',') ? ';' : ',';
}

/**
 * Checks decoded text piece by piece: NUL characters, line endings (normalised to LF, mixture
 * reported once), whether any quote has been seen (rows can only span lines when it has).
 */
class TextGate {
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

  constructor(private readonly findings: FindingCollector) {}

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
    this.newlines += countChar(text, '\n');
    this.track(text);
    return text;
  }

  /** Flushes a held CR at the end of the input. */
  finish(): string {
    if (this.heldCR && !this.stopped) {
      this.heldCR = false;
      this.noteEnding('cr', '\r', 0);
      this.newlines++;
      this.track('\n');
      return '\n';
    }
    return '';
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

function countOccurrences(text: string, needle: string): number {
  let n = 0;
  let i = text.indexOf(needle);
  while (i !== -1) {
    n++;
    i = text.indexOf(needle, i + needle.length);
  }
  return n;
}

/** Line breaks in raw (not yet normalised) text: CRLF, CR and LF each count once. */
function countLineBreaks(text: string): number {
  return countChar(text, '\n') + countChar(text, '\r') - countOccurrences(text, '\r\n');
}

/**
 * Checks raw bytes piece by piece: size limit, byte-order marks, ZIP/Excel signatures, strict
 * UTF-8 decoding.
 */
class ByteGate {
  bytes = 0;
  bom = false;
  stopped = false;
  private first = true;
  private textStarted = false;
  private readonly decoder = new TextDecoder('utf-8', { fatal: true, ignoreBOM: true });

  constructor(
    private readonly findings: FindingCollector,
    private readonly maxBytes: number,
    private readonly text: TextGate,
  ) {}

  /** Returns decoded text (BOM removed), or null when reading must stop. */
  push(chunk: Uint8Array): string | null {
    if (this.stopped) return null;
    this.bytes += chunk.byteLength;
    if (this.bytes > this.maxBytes) {
      tooLarge(this.findings, this.bytes, this.maxBytes, true);
      this.stopped = true;
      return null;
    }
    if (this.first && chunk.byteLength > 0) {
      this.first = false;
      if (!this.checkSignature(chunk)) {
        this.stopped = true;
        return null;
      }
    }
    let text: string;
    try {
      text = this.decoder.decode(chunk, { stream: true });
    } catch {
      this.invalidUtf8(chunk);
      return null;
    }
    if (!this.textStarted && text.length > 0) {
      this.textStarted = true;
      if (text.charCodeAt(0) === 0xfeff) {
        this.bom = true;
        text = text.slice(1);
      }
    }
    return text;
  }

  finish(): string | null {
    if (this.stopped) return null;
    try {
      return this.decoder.decode();
    } catch {
      this.findings.error(
        'invalid-utf8',
        this.text.newlines + 1,
        null,
        null,
        'The file ends in the middle of a UTF-8 character, so it is cut short or not UTF-8. Save it again as "CSV UTF-8" and upload the whole file.',
      );
      this.stopped = true;
      return null;
    }
  }

  private checkSignature(chunk: Uint8Array): boolean {
    const b0 = chunk[0];
    const b1 = chunk.byteLength > 1 ? chunk[1] : -1;
    if ((b0 === 0xff && b1 === 0xfe) || (b0 === 0xfe && b1 === 0xff)) {
      this.findings.error(
        'unsupported-encoding',
        1,
        null,
        null,
        'The file is UTF-16 encoded. Save it as "CSV UTF-8 (comma delimited)" and upload that.',
      );
      return false;
    }
    if (b0 === 0x50 && b1 === 0x4b && chunk.byteLength > 3 && chunk[2] === 0x03 && chunk[3] === 0x04) {
      this.findings.error(
        'binary-content',
        1,
        null,
        null,
        'The file is a ZIP archive (an Excel .xlsx workbook is one), not CSV text. Open it in your spreadsheet and export the sheet as CSV (UTF-8).',
      );
      return false;
    }
    return true;
  }

  private invalidUtf8(chunk: Uint8Array): void {
    // Find where: decode leniently and look for the replacement character.
    const lenient = new TextDecoder('utf-8').decode(chunk);
    const at = lenient.indexOf('\ufffd');
    const line = this.text.newlines + 1 + (at >= 0 ? countLineBreaks(lenient.slice(0, at)) : 0);
    const hasNul = chunk.indexOf(0) !== -1;
    this.findings.error(
      hasNul ? 'binary-content' : 'invalid-utf8',
      line,
      null,
      null,
      hasNul
        ? 'The file contains binary data (NUL bytes, invalid UTF-8), so it is not a text CSV file. Export the data as CSV (UTF-8) and upload that.'
        : `Line ${line} contains bytes that are not valid UTF-8 (perhaps the file was saved as Latin-1 or Windows-1252). Save it as "CSV UTF-8" and upload it again.`,
    );
    this.stopped = true;
  }
}

function tooLarge(findings: FindingCollector, bytes: number, maxBytes: number, streaming: boolean): void {
  findings.error(
    'file-too-large',
    null,
    null,
    streaming ? `more than ${maxBytes} bytes` : String(bytes),
    `The file is larger than the limit of ${formatBytes(maxBytes)}${streaming ? '' : ` (it has ${formatBytes(bytes)})`}. Split it into smaller files (for example by segment) or ask an administrator to raise the limit.`,
  );
}

/**
 * Turns papaparse results into sink calls with physical line numbers, handles the header,
 * blank lines, field counts and quote errors.
 */
class RowFeeder {
  line = 1;
  width = 0;
  dataRows = 0;
  headerSeen = false;
  stopped = false;
  private delimiterName: string;

  constructor(
    private readonly sink: CsvSink,
    private readonly findings: FindingCollector,
    private readonly gate: TextGate,
    private readonly delimiter: Delimiter,
    private readonly maxDataRows = Infinity,
  ) {
    this.delimiterName = delimiter === ';' ? 'semicolons' : 'commas';
  }

  onResults(results: Papa.ParseResult<string[]>): void {
    const data = results.data;
    let bad: Map<number, Papa.ParseError> | null = null;
    if (results.errors.length > 0) {
      bad = new Map();
      for (const e of results.errors) if (e.row !== undefined && !bad.has(e.row)) bad.set(e.row, e);
    }
    const quotes = this.gate.sawQuote;
    for (let i = 0; i < data.length; i++) {
      const fields = data[i];
      const line = this.line;
      this.line += quotes ? 1 + newlinesInRow(fields) : 1;
      if (this.stopped) continue;
      if (bad !== null && bad.has(i)) {
        this.quoteError(bad.get(i)!, line);
        if (!this.headerSeen) this.stopped = true;
        continue;
      }
      if (fields.length === 1 && fields[0].trim() === '') continue; // blank line
      if (!this.headerSeen) {
        this.onHeader(fields, line);
        continue;
      }
      this.dataRows++;
      if (this.dataRows >= this.maxDataRows) this.stopped = true;
      if (fields.length !== this.width && !this.fixWidth(fields, line)) continue;
      this.sink.row(fields, line);
    }
  }

  private onHeader(fields: string[], line: number): void {
    this.headerSeen = true;
    const names = fields.map((f, i) => (i === 0 ? f.replace(/^\ufeff/, '') : f).trim().toLowerCase());
    // Spreadsheets sometimes write trailing empty columns; drop them.
    while (names.length > 1 && names[names.length - 1] === '') names.pop();
    this.width = names.length;
    let ok = true;
    const seen = new Set<string>();
    names.forEach((name, i) => {
      if (name === '') {
        ok = false;
        this.findings.error(
          'empty-column-name',
          line,
          null,
          null,
          `Column ${i + 1} of the header has no name. Give every column one of the expected names, or delete the empty column.`,
        );
      } else if (seen.has(name)) {
        ok = false;
        this.findings.error('duplicate-column', line, name, name, `The header names the column "${name}" twice. Keep one and rename or delete the other.`);
      }
      seen.add(name);
    });
    if (names.length === 1 && /\t/.test(fields[0])) {
      ok = false;
      this.findings.error(
        'unsupported-delimiter',
        line,
        null,
        null,
        'The header is separated by tabs. Rhobook reads comma- or semicolon-separated files: export as CSV and upload again.',
      );
    }
    if (!ok || !this.sink.header(names, line, this.delimiter)) this.stopped = true;
  }

  /** Accepts extra empty trailing fields; reports too few or too many. Returns true when the row can be used. */
  private fixWidth(fields: string[], line: number): boolean {
    if (fields.length > this.width) {
      let extraEmpty = true;
      for (let j = this.width; j < fields.length; j++) if (fields[j].trim() !== '') extraEmpty = false;
      if (extraEmpty) {
        fields.length = this.width;
        return true;
      }
      this.findings.error(
        'too-many-fields',
        line,
        null,
        String(fields.length),
        () =>
          `Line ${line} has ${fields.length} fields but the header has ${this.width}. A value probably contains the delimiter (${this.delimiterName}): put such values in double quotes, or remove the extra field.`,
      );
      return false;
    }
    this.findings.error(
      'too-few-fields',
      line,
      null,
      String(fields.length),
      () => `Line ${line} has ${fields.length} field${fields.length === 1 ? '' : 's'} but the header has ${this.width}. Fill in the missing values (leave them empty between ${this.delimiterName} where allowed).`,
    );
    return false;
  }

  private quoteError(e: Papa.ParseError, line: number): void {
    this.findings.error(
      'malformed-quotes',
      line,
      null,
      null,
      e.code === 'MissingQuotes'
        ? `A quoted value that starts on line ${line} is never closed. Add the closing double quote; a double quote inside a quoted value is written twice ("").`
        : `Line ${line} has a double quote in the wrong place. Quote the whole value and write an inner double quote twice ("").`,
    );
  }

  finish(info: { stopped: boolean }): void {
    if (info.stopped) return;
    if (!this.headerSeen) {
      this.findings.error('empty-file', null, null, null, 'The file is empty. Upload a CSV file with a header line and at least one data row.');
    } else if (this.dataRows === 0 && !this.stopped) {
      this.findings.error('no-data-rows', 1, null, null, 'The file has a header but no data rows. Add at least one row under the header.');
    }
  }
}

function papaConfig(delimiter: Delimiter, feeder: RowFeeder) {
  return {
    delimiter,
    newline: '\n' as const,
    quoteChar: '"',
    header: false,
    dynamicTyping: false,
    skipEmptyLines: false as const,
    chunk: (results: Papa.ParseResult<string[]>) => feeder.onResults(results),
  };
}

function firstLineOf(text: string): string {
  const nl = text.indexOf('\n');
  return nl === -1 ? text : text.slice(0, nl);
}

function infoOf(bytes: number, bom: boolean, delimiter: Delimiter, gate: TextGate, feeder: RowFeeder | null, stopped: boolean): ReadInfo {
  return {
    bytes,
    bom,
    delimiter,
    lineEndings: [...gate.endings],
    lines: gate.lines,
    dataRows: feeder ? feeder.dataRows : 0,
    stopped: stopped || (feeder?.stopped ?? false),
  };
}

/**
 * Reads a whole file held in memory. Pass the raw bytes when you have them: only then can invalid
 * UTF-8 be detected (a string has already been decoded).
 */
export function readCsvText(input: string | Uint8Array, sink: CsvSink, findings: FindingCollector, options: ReadOptions = {}): ReadInfo {
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_UPLOAD_BYTES;
  const gate = new TextGate(findings);
  let text: string;
  let bytes: number;
  let bom = false;
  if (typeof input === 'string') {
    bytes = Buffer.byteLength(input, 'utf8');
    if (bytes > maxBytes) {
      tooLarge(findings, bytes, maxBytes, false);
      return infoOf(bytes, false, ',', gate, null, true);
    }
    text = input;
    if (text.charCodeAt(0) === 0xfeff) {
      bom = true;
      text = text.slice(1);
    }
  } else {
    bytes = input.byteLength;
    if (bytes > maxBytes) {
      tooLarge(findings, bytes, maxBytes, false);
      return infoOf(bytes, false, ',', gate, null, true);
    }
    const bg = new ByteGate(findings, maxBytes, gate);
    const decoded = bg.push(input);
    const tail = decoded === null ? null : bg.finish();
    if (decoded === null || tail === null) return infoOf(bytes, bg.bom, ',', gate, null, true);
    text = decoded + tail;
    bom = bg.bom;
  }
  const normalised = gate.push(text);
  if (normalised === null) return infoOf(bytes, bom, ',', gate, null, true);
  const all = normalised + gate.finish();
  const delimiter = detectDelimiter(firstLineOf(all));
  const feeder = new RowFeeder(sink, findings, gate, delimiter, options.maxDataRows);
  if (all.length > 0) Papa.parse<string[]>(all, { ...papaConfig(delimiter, feeder), chunkSize: 4 * 1024 * 1024, complete: () => undefined });
  feeder.finish({ stopped: false });
  return infoOf(bytes, bom, delimiter, gate, feeder, false);
}

/**
 * Reads a file from a stream of chunks without holding it whole: the memory used is the chunk
 * size plus what the sink keeps.
 */
export async function readCsvStream(source: ByteSource, sink: CsvSink, findings: FindingCollector, options: ReadOptions = {}): Promise<ReadInfo> {
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_UPLOAD_BYTES;
  const gate = new TextGate(findings);
  const bytesGate = new ByteGate(findings, maxBytes, gate);
  const encoder = new TextEncoder();
  let feeder: RowFeeder | null = null;

  const iterator = source[Symbol.asyncIterator]();
  let ended = false;
  /** Next normalised text piece; null at the end or when reading must stop. */
  async function next(): Promise<string | null> {
    for (;;) {
      if (ended || bytesGate.stopped || gate.stopped || feeder?.stopped) {
        if (!ended) {
          ended = true;
          await iterator.return?.();
        }
        return null;
      }
      const r = await iterator.next();
      if (r.done) {
        ended = true;
        const tail = bytesGate.finish();
        if (tail === null) return null;
        const t = gate.push(tail);
        if (t === null) return null;
        const last = t + gate.finish();
        return last.length > 0 ? last : null;
      }
      const chunk = typeof r.value === 'string' ? encoder.encode(r.value) : r.value;
      const decoded = bytesGate.push(chunk);
      if (decoded === null) continue; // stopped: loop ends the iterator
      const t = gate.push(decoded);
      if (t === null) continue;
      if (t.length > 0) return t;
    }
  }

  // The delimiter is chosen from the first line, so read until it is complete (or the input ends).
  let head = '';
  for (;;) {
    const t = await next();
    if (t === null) break;
    head += t;
    if (head.indexOf('\n') !== -1 || head.length > 1024 * 1024) break;
  }
  const stoppedEarly = bytesGate.stopped || gate.stopped;
  const delimiter = detectDelimiter(firstLineOf(head));
  if (stoppedEarly) return infoOf(bytesGate.bytes, bytesGate.bom, delimiter, gate, null, true);
  const rowFeeder = new RowFeeder(sink, findings, gate, delimiter, options.maxDataRows);
  feeder = rowFeeder;

  if (head.length > 0) {
    async function* pieces(): AsyncGenerator<string> {
      yield head;
      for (;;) {
        const t = await next();
        if (t === null) return;
        yield t;
      }
    }
    const readable = Readable.from(pieces(), { objectMode: true });
    await new Promise<void>((resolve, reject) => {
      Papa.parse<string[]>(readable as unknown as File, {
        ...papaConfig(delimiter, rowFeeder),
        complete: () => resolve(),
        error: (err: Error) => reject(err),
      });
    });
  }
  const stopped = bytesGate.stopped || gate.stopped;
  rowFeeder.finish({ stopped });
  return infoOf(bytesGate.bytes, bytesGate.bom, delimiter, gate, rowFeeder, stopped);
}

/** Column layout of an upload kind. */
export interface ColumnSpec<R extends string, O extends string> {
  required: readonly R[];
  optional: readonly O[];
}

const RATE_NAME = /rate|pct|percent|%|ratio|share|prob|(^|_)pd($|_)|(^|_)dr($|_)/;

/**
 * Maps header names to column indexes. Missing required columns are errors; unknown columns are
 * warnings (the column is ignored and not stored), except that a rate-like column standing in for a
 * missing count is the error `rate-instead-of-count`. Returns null when a required column is missing.
 */
export function mapColumns<R extends string, O extends string>(
  names: string[],
  spec: ColumnSpec<R, O>,
  line: number,
  findings: FindingCollector,
  kindLabel: string,
): { [K in R]: number } & { [K in O]?: number } | null {
  const index = new Map<string, number>();
  names.forEach((n, i) => index.set(n, i));
  const known = new Set<string>([...spec.required, ...spec.optional]);
  const expected = [...spec.required].join(', ');
  const missing = spec.required.filter((r) => !index.has(r));
  const unknown = names.filter((n) => n !== '' && !known.has(n));
  const rateLike = unknown.filter((n) => RATE_NAME.test(n));
  for (const m of missing) {
    findings.error(
      'missing-column',
      line,
      m,
      null,
      `The required column "${m}" is missing. A ${kindLabel} file needs the columns ${expected}${spec.optional.length ? ` (optional: ${spec.optional.join(', ')})` : ''}; column names are not case-sensitive.`,
    );
  }
  for (const u of unknown) {
    if (rateLike.includes(u) && missing.length > 0) {
      findings.error(
        'rate-instead-of-count',
        line,
        u,
        u,
        `The column "${u}" looks like a rate or percentage. Rhobook needs counts, not rates: give the number of obligors and the number of defaults as whole numbers (columns ${missing.join(', ')}).`,
      );
    } else {
      findings.warning(
        'unknown-column',
        line,
        u,
        u,
        `The column "${u}" is not one Rhobook reads, so it is ignored and not stored. Expected columns: ${[...spec.required, ...spec.optional].join(', ')}.`,
      );
    }
  }
  if (missing.length > 0) return null;
  const out: Record<string, number> = {};
  for (const k of known) if (index.has(k)) out[k] = index.get(k)!;
  return out as { [K in R]: number } & { [K in O]?: number };
}
