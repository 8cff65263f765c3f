/**
 * Checks raw bytes piece by piece before they are decoded: the size limit, byte-order marks,
 * ZIP/Excel and UTF-16 signatures, strict UTF-8. Part of csv-reader.ts's reading.
 */
import type { FindingCollector } from './findings';
import { formatBytes } from './limits';
import { countLineBreaks, type TextGate } from './text-gate';

/**
 * Checks raw bytes piece by piece: size limit, byte-order marks, ZIP/Excel signatures, strict
 * UTF-8 decoding.
 */
export class ByteGate {
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

export function tooLarge(findings: FindingCollector, bytes: number, maxBytes: number, streaming: boolean): void {
  findings.error(
    'file-too-large',
    null,
    null,
    streaming ? `more than ${maxBytes} bytes` : String(bytes),
    `The file is larger than the limit of ${formatBytes(maxBytes)}${streaming ? '' : ` (it has ${formatBytes(bytes)})`}. Split it into smaller files (for example by segment) or ask an administrator to raise the limit.`,
  );
}
