/** SHA-256 of an upload's raw bytes, as lower-case hex: the dataset's identity (the same bytes are recognised on a second upload). */
import { createHash } from 'node:crypto';
import type { ByteSource } from './csv-reader';

export function sha256Hex(bytes: Uint8Array | string): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/** Incremental hash for streamed uploads: feed every chunk, then call `digest()`. */
export function createSha256(): { update(chunk: Uint8Array | string): void; digest(): string } {
  const h = createHash('sha256');
  return {
    update: (chunk) => {
      h.update(chunk);
    },
    digest: () => h.digest('hex'),
  };
}

/** Hashes a whole stream. */
export async function sha256OfStream(source: ByteSource): Promise<string> {
  const h = createHash('sha256');
  for await (const chunk of source) h.update(chunk);
  return h.digest('hex');
}

/**
 * Wraps a source so that its bytes are hashed while a validator reads it: one pass for both.
 * `digest()` is valid after the source has been read to the end.
 */
export function hashingSource(source: ByteSource): { source: ByteSource; digest(): string } {
  const h = createHash('sha256');
  let result: string | null = null;
  async function* pass(): AsyncGenerator<Uint8Array | string> {
    for await (const chunk of source) {
      h.update(chunk);
      yield chunk;
    }
    result = h.digest('hex');
  }
  return {
    source: pass(),
    digest: () => {
      if (result === null) throw new Error('hashingSource: the source has not been read to the end yet.');
      return result;
    },
  };
}
