/**
 * Mapping a file's header to the columns of its upload kind: which required columns are missing,
 * which are unknown (ignored), and where each known column is.
 */
import type { FindingCollector } from './findings';

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
