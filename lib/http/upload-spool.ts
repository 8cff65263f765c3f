import { createReadStream, createWriteStream, type WriteStream } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';

/**
 * The compressed copy of an upload while it is validated and stored: a temporary file readable by
 * this process's user only, so that what an upload holds in memory does not grow with its size
 * (the upload is read back from here twice, once to validate and once to store, in bounded
 * pieces). `dispose` removes it; the route calls it when the request ends, whatever happened.
 */
export type UploadSpool = {
  /** a stream writing the file (call once) */
  writer(): WriteStream;
  /** the file's bytes from the start, in pieces of at most 1 MB */
  reader(): AsyncIterable<Uint8Array>;
  dispose(): Promise<void>;
};

const READ_PIECE_BYTES = 1024 * 1024;

export async function createUploadSpool(): Promise<UploadSpool> {
  const dir = await mkdtemp(path.join(os.tmpdir(), 'rhobook-upload-'));
  const file = path.join(dir, 'upload.gz');
  return {
    writer: () => createWriteStream(file, { flags: 'wx', mode: 0o600 }),
    reader: () => createReadStream(file, { highWaterMark: READ_PIECE_BYTES }),
    dispose: () => rm(dir, { recursive: true, force: true }),
  };
}
