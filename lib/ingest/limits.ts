/**
 * Size limits for uploads. The route handler may pass its own limit (from configuration) to every
 * validator through `maxBytes`; this is the default.
 */

/** Default largest accepted upload: 100 MB (100 * 1024 * 1024 bytes), counted on the raw bytes. */
export const DEFAULT_MAX_UPLOAD_BYTES = 100 * 1024 * 1024;

/**
 * Longest accepted row, in characters (64 KB of plain text): a row of any upload kind is far
 * shorter, and a longer one (a file whose line breaks were lost, a quote never closed) would cost
 * the parser time that grows with the square of its length. UPLOAD_MAX_LINE_CHARS overrides it.
 */
export const DEFAULT_MAX_LINE_CHARS = 64 * 1024;

/**
 * Most columns accepted in a header: the upload kinds have at most six, and spreadsheets may add
 * some empty ones at the end. UPLOAD_MAX_COLUMNS overrides it.
 */
export const DEFAULT_MAX_COLUMNS = 1000;

/** Longest accepted segment name, in characters. */
export const MAX_SEGMENT_CHARS = 100;

/** Longest accepted free-text cell (note, default_definition, loan_id), in characters. */
export const MAX_TEXT_CHARS = 1000;

export function formatBytes(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${(bytes / (1024 * 1024)).toFixed(1)} MB`;
  if (bytes >= 1024) return `${(bytes / 1024).toFixed(1)} KB`;
  return `${bytes} bytes`;
}
