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
 * - One record (a line, or lines held together by a quoted value) longer than `maxLineChars`
 *   characters is the error `line-too-long`, a header of more than `maxColumns` columns the error
 *   `too-many-columns`, both naming the line; reading stops there, before the parser has spent
 *   more than the limit on it (record-guard.ts).
 *
 * Streaming: `readCsvStream` pulls the source chunk by chunk and hands papaparse a Node Readable,
 * whose `chunk` callback passes arrays of rows to the sink; nothing here keeps rows, so memory is
 * bounded by the chunk size plus whatever the sink keeps.
 */
import Papa from 'papaparse';
import { Readable } from 'node:stream';
import { ByteGate, tooLarge } from './byte-gate';
import { FindingCollector } from './findings';
import { DEFAULT_MAX_COLUMNS, DEFAULT_MAX_LINE_CHARS, DEFAULT_MAX_UPLOAD_BYTES } from './limits';
import { countChar, TextGate, type LineEnding } from './text-gate';

export type Delimiter = ',' | ';';
export type { LineEnding } from './text-gate';

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
  /** Longest accepted record in characters; default DEFAULT_MAX_LINE_CHARS (64 KB). */
  maxLineChars?: number;
  /** Most columns accepted in the header; default DEFAULT_MAX_COLUMNS (1,000). */
  maxColumns?: number;
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
      if (this.gate.cutLine !== null && line >= this.gate.cutLine) this.stopped = true;
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
  const gate = new TextGate(findings, options.maxLineChars ?? DEFAULT_MAX_LINE_CHARS, options.maxColumns ?? DEFAULT_MAX_COLUMNS);
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
  feeder.finish({ stopped: gate.stopped });
  return infoOf(bytes, bom, delimiter, gate, feeder, gate.stopped);
}

/**
 * Reads a file from a stream of chunks without holding it whole: the memory used is the chunk
 * size plus what the sink keeps.
 */
export async function readCsvStream(source: ByteSource, sink: CsvSink, findings: FindingCollector, options: ReadOptions = {}): Promise<ReadInfo> {
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_UPLOAD_BYTES;
  const gate = new TextGate(findings, options.maxLineChars ?? DEFAULT_MAX_LINE_CHARS, options.maxColumns ?? DEFAULT_MAX_COLUMNS);
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
  // A record over the limits stops the reading too, but the whole records before it are still read.
  const stoppedEarly = bytesGate.stopped || (gate.stopped && gate.cutLine === null);
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
