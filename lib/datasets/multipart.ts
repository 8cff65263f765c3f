/**
 * Reads a multipart upload (`POST /api/datasets`) as a stream: the form fields, and the one file
 * part counted, hashed (SHA-256) and gzip-compressed while it arrives. The raw file is never held
 * whole in memory; only its compressed form is (a CSV compresses about 5-10 times).
 *
 * The size limit is applied twice: by the route before reading anything (Content-Length), and here
 * while streaming, for bodies without a truthful Content-Length; reading stops as soon as the file
 * passes the limit.
 */
import Busboy from 'busboy';
import { createHash } from 'node:crypto';
import { Readable, Transform, Writable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { createGzip } from 'node:zlib';
import { AppError } from '@/lib/errors';
import { formatBytes } from '@/lib/ingest/limits';

export type ReceivedFile = {
  /** file name given by the client (base name only, at most 255 characters) */
  fileName: string;
  sizeBytes: number;
  sha256: string;
  /** the file gzip-compressed, in the pieces zlib produced */
  gz: Buffer[];
};

export type ReceivedUpload = { fields: Record<string, string>; file: ReceivedFile | null };

const MAX_FIELDS = 20;
const MAX_FIELD_BYTES = 20_000;

export function tooLargeError(sizeText: string | null, maxBytes: number): AppError {
  return new AppError(
    'too_large:upload',
    `The file is larger than the limit of ${formatBytes(maxBytes)}${sizeText ? ` (the request declares ${sizeText})` : ''}. Split the file (for example by segment or by year) or ask an administrator to raise UPLOAD_MAX_BYTES.`,
    { maxBytes },
  );
}

/** The base name of a client-supplied file name, without path parts or control characters. */
export function cleanFileName(name: string | undefined): string {
  const base = (name ?? '').split(/[\\/]/).pop() ?? '';
  const clean = base.replace(/[\u0000-\u001f\u007f]/g, '').trim();
  return (clean || 'upload.csv').slice(0, 255);
}

/**
 * Parses the body. Throws `too_large:upload` (413) past `maxBytes`, `bad_request:upload-form` (400)
 * for a body that is not multipart/form-data or holds more than one file.
 */
export async function receiveUpload(req: Request, maxBytes: number): Promise<ReceivedUpload> {
  const contentType = req.headers.get('content-type') ?? '';
  if (!/^multipart\/form-data/i.test(contentType)) {
    throw new AppError(
      'bad_request:upload-form',
      'Send the upload as multipart/form-data with the fields kind, name (optional description) and the file in a part named "file".',
    );
  }
  if (!req.body) throw new AppError('bad_request:upload-form', 'The request has no body. Attach the file in a part named "file".');

  let busboy: Busboy.Busboy;
  try {
    busboy = Busboy({
      headers: { 'content-type': contentType },
      limits: { files: 1, fields: MAX_FIELDS, fieldSize: MAX_FIELD_BYTES, parts: MAX_FIELDS + 1 },
    });
  } catch {
    throw new AppError('bad_request:upload-form', 'The multipart body has no boundary. Send the upload as multipart/form-data.');
  }

  const fields: Record<string, string> = {};
  let file: ReceivedFile | null = null;
  let filePromise: Promise<void> | null = null;
  let failure: AppError | null = null;
  const source = Readable.fromWeb(req.body as import('node:stream/web').ReadableStream<Uint8Array>);

  const fail = (err: AppError) => {
    if (!failure) failure = err;
    source.destroy();
  };

  busboy.on('field', (name, value, info) => {
    if (info.valueTruncated) {
      fail(new AppError('bad_request:upload-form', `The field "${name}" is longer than ${MAX_FIELD_BYTES} bytes.`));
      return;
    }
    fields[name] = value;
  });
  busboy.on('filesLimit', () => fail(new AppError('bad_request:upload-form', 'Send one file per upload.')));
  busboy.on('fieldsLimit', () => fail(new AppError('bad_request:upload-form', 'The form has too many fields.')));
  busboy.on('file', (name, stream, info) => {
    if (name !== 'file' || file !== null) {
      stream.resume();
      fail(new AppError('bad_request:upload-form', `Unexpected file part "${name}": put the file in one part named "file".`));
      return;
    }
    const hash = createHash('sha256');
    const gz: Buffer[] = [];
    let size = 0;
    const received: ReceivedFile = { fileName: cleanFileName(info.filename), sizeBytes: 0, sha256: '', gz };
    file = received;
    const counter = new Transform({
      transform(chunk: Buffer, _enc, cb) {
        size += chunk.length;
        if (size > maxBytes) {
          cb(tooLargeError(null, maxBytes));
          return;
        }
        hash.update(chunk);
        cb(null, chunk);
      },
    });
    const collector = new Writable({
      write(chunk: Buffer, _enc, cb) {
        gz.push(chunk);
        cb();
      },
    });
    filePromise = pipeline(stream, counter, createGzip({ level: 5 }), collector)
      .then(() => {
        received.sizeBytes = size;
        received.sha256 = hash.digest('hex');
      })
      .catch((err: unknown) => {
        fail(err instanceof AppError ? err : new AppError('bad_request:upload-form', 'The file could not be read from the request.'));
        stream.resume();
      });
  });

  try {
    await pipeline(source, busboy);
  } catch (err) {
    if (!failure) {
      failure =
        err instanceof AppError
          ? err
          : new AppError('bad_request:upload-form', 'The upload was cut off or is not valid multipart/form-data. Try again.');
    }
  }
  if (filePromise) await filePromise;
  if (failure) throw failure;
  return { fields, file };
}

/** The compressed pieces as one source of raw bytes (for the validators). */
export function gunzipSource(gz: readonly Buffer[]): AsyncIterable<Uint8Array> {
  // Imported lazily so that this module stays light for the route's import graph.
  return (async function* () {
    const { createGunzip } = await import('node:zlib');
    const gunzip = createGunzip();
    const input = Readable.from(gz);
    input.pipe(gunzip);
    for await (const chunk of gunzip) yield chunk as Buffer;
  })();
}
