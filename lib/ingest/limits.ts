/**
 * Size limits for uploads. The route handler may pass its own limit (from configuration) to every
 * validator through `maxBytes`; this is the default.
 */

/** Default largest accepted upload: 100 MB (100 * 1024 * 1024 bytes), counted on the raw bytes. */
export const DEFAULT_MAX_UPLOAD_BYTES = 100 * 1024 * 1024;

/** Longest accepted segment name, in characters. */
export const MAX_SEGMENT_CHARS = 100;

/** Longest accepted free-text cell (note, default_definition, loan_id), in characters. */
export const MAX_TEXT_CHARS = 1000;

export function formatBytes(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${(bytes / (1024 * 1024)).toFixed(1)} MB`;
  if (bytes >= 1024) return `${(bytes / 1024).toFixed(1)} KB`;
  return `${bytes} bytes`;
}
