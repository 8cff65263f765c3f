/**
 * Receives a multipart upload (`POST /api/datasets`) as a stream: the form fields, and the one file
 * part counted, hashed (SHA-256) and gzip-compressed while it arrives into a temporary file
 * (lib/http/upload-spool.ts). Neither the raw file nor its compressed copy is held in memory.
 *
 * The size limit is applied twice: before reading anything (a declared Content-Length over the
 * limit), and while streaming, for bodies without a truthful Content-Length; reading stops as
 * soon as the file passes the limit. What the file says is checked later (lib/ingest/upload.ts).
 */
import Busboy from 'busboy';
import { createHash } from 'node:crypto';
import { Readable, Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { createGzip } from 'node:zlib';
import { AppError } from '@/lib/errors';
import { formatBytes } from '@/lib/ingest/limits';
import type { UploadedFile } from '@/lib/ingest/upload';
import { createUploadSpool, type UploadSpool } from './upload-spool';

export type ReceivedUpload = { fields: Record<string, string>; file: UploadedFile | null };

const MAX_FIELDS = 20;
const MAX_FIELD_BYTES = 20_000;
/** Room for the multipart framing and the form fields beside the file in a declared Content-Length. */
const FRAMING_BYTES = 64 * 1024;

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
 * Receives the upload, runs `handle` on it, and removes its temporary file afterwards (also when
 * receiving or `handle` fails). Throws `too_large:upload` (413) past `maxBytes`,
 * `bad_request:upload-form` (400) for a body that is not multipart/form-data or holds more than
 * one file.
 */
export async function withReceivedUpload<T>(req: Request, maxBytes: number, handle: (upload: ReceivedUpload) => Promise<T>): Promise<T> {
  const declared = Number(req.headers.get('content-length') ?? NaN);
  // Refuse before reading a byte.
  if (Number.isFinite(declared) && declared > maxBytes + FRAMING_BYTES) throw tooLargeError(formatBytes(declared), maxBytes);
  const spool = await createUploadSpool();
  try {
    return await handle(await receive(req, maxBytes, spool));
  } finally {
    await spool.dispose();
  }
}

async function receive(req: Request, maxBytes: number, spool: UploadSpool): Promise<ReceivedUpload> {
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
  let file: UploadedFile | null = null;
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
    let size = 0;
    const received: UploadedFile = { fileName: cleanFileName(info.filename), sizeBytes: 0, sha256: '', gzip: spool.reader };
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
    filePromise = pipeline(stream, counter, createGzip({ level: 5 }), spool.writer())
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
