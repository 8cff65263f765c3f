import { Readable } from 'node:stream';
import { createGunzip } from 'node:zlib';
import type { ByteSource } from './csv-reader';

/**
 * The raw bytes of a gzip-compressed file given in pieces (a stored dataset's rows, an upload's
 * temporary file), as a source the validators read. The pieces are pulled only as fast as the
 * reader reads, and a reader that stops early (the loan-tape header check) stops the pulling too.
 */
export async function* gunzipSource(gz: AsyncIterable<Uint8Array> | Iterable<Uint8Array>): ByteSource {
  const input = Readable.from(gz, { objectMode: false });
  const gunzip = createGunzip();
  input.on('error', (err) => gunzip.destroy(err));
  input.pipe(gunzip);
  try {
    for await (const chunk of gunzip) yield chunk as Buffer;
  } finally {
    input.destroy();
    gunzip.destroy();
  }
}
