/**
 * The definition of default carried with the data: a cohort file's optional `default_definition`
 * column (per row), or the field given at upload for a file without one (every row that names no
 * definition takes it). A correlation is valid only with the definition of default it was fitted
 * on, so the definition travels from the rows to the dataset page, the fit, the assumption, its
 * reports, the API and the CSV export, and a change across the years of a segment is flagged:
 *
 * - `default-definition-change` (warning, once per segment): the segment's rows name more than one
 *   definition; the years of each are listed. A fit across the change mixes two kinds of default.
 * - `default-definition-partial` (warning, once per segment): some of the segment's rows name a
 *   definition and others do not; those take the definition given at upload, if any.
 */
import type { FindingCollector } from './findings';

/** The years a definition of default covers in one segment, in period order. */
export type DefinitionSpan = { definition: string | null; from: string; to: string; periods: string[] };

/** A definition's text as compared: trimmed, inner white space collapsed. */
export function normaliseDefinition(d: string | null | undefined): string | null {
  const t = (d ?? '').trim().replace(/\s+/g, ' ');
  return t ? t : null;
}

/**
 * Groups a segment's periods by definition of default, consecutive runs apart (a definition that
 * comes back after another is a new span). `rows` may come in any order.
 *
 * @example definitionSpans([{ period: '2019', definition: '90 dpd' }, { period: '2020', definition: '90 dpd' }])
 *          // [{ definition: '90 dpd', from: '2019', to: '2020', periods: ['2019', '2020'] }]
 */
export function definitionSpans(rows: readonly { period: string | number; definition: string | null | undefined }[]): DefinitionSpan[] {
  const sorted = [...rows].map((r) => ({ period: String(r.period), definition: normaliseDefinition(r.definition) })).sort((a, b) => Number(a.period) - Number(b.period));
  const spans: DefinitionSpan[] = [];
  for (const r of sorted) {
    const last = spans[spans.length - 1];
    if (last && last.definition === r.definition) {
      last.to = r.period;
      last.periods.push(r.period);
    } else {
      spans.push({ definition: r.definition, from: r.period, to: r.period, periods: [r.period] });
    }
  }
  return spans;
}

/** True when the spans name more than one definition (an unnamed span counts as one of them). */
export function isMixed(spans: readonly DefinitionSpan[]): boolean {
  return new Set(spans.map((s) => s.definition)).size > 1;
}

/** The spans in words: "90 days past due (2008-2015); 120 days past due (2016-2020)". */
export function describeSpans(spans: readonly DefinitionSpan[]): string | null {
  if (!spans.length) return null;
  if (!isMixed(spans)) return spans[0].definition;
  return spans.map((s) => `${s.definition ?? 'not stated'} (${s.from === s.to ? s.from : `${s.from}-${s.to}`})`).join('; ');
}

/** The caution a value fitted over mixed definitions carries, or null. */
export function mixedDefinitionCaution(spans: readonly DefinitionSpan[]): string | null {
  if (!isMixed(spans)) return null;
  return `The data behind this value mix definitions of default across the years: ${describeSpans(spans)}. A correlation fitted across a change of definition mixes two kinds of default; read it with that in mind or fit the years of one definition.`;
}

/** Upload-time warnings on the definitions of each segment of a cohort file (see the file comment). */
export function checkDefaultDefinitions(
  rows: readonly { segment: string; period: string; line: number | null; defaultDefinition?: string }[],
  findings: FindingCollector,
): void {
  const bySegment = new Map<string, typeof rows[number][]>();
  for (const r of rows) {
    let list = bySegment.get(r.segment);
    if (!list) bySegment.set(r.segment, (list = []));
    list.push(r);
  }
  for (const [segment, list] of bySegment) {
    const spans = definitionSpans(list.map((r) => ({ period: r.period, definition: r.defaultDefinition })));
    const named = spans.filter((s) => s.definition !== null);
    if (new Set(named.map((s) => s.definition)).size > 1) {
      const change = named.find((s, i) => i > 0 && s.definition !== named[i - 1].definition)!;
      const line = list.find((r) => r.period === change.from)?.line ?? null;
      findings.warning(
        'default-definition-change',
        line,
        'default_definition',
        change.definition,
        `The definition of default of segment "${segment}" changes across the years: ${describeSpans(named)}. A fit across the change mixes two kinds of default; its results will say so. Waive this warning with a reason if the change is immaterial, or fit the years of one definition.`,
      );
    }
    if (named.length && named.length < spans.length) {
      const unnamed = spans.filter((s) => s.definition === null).flatMap((s) => s.periods);
      const line = list.find((r) => r.period === unnamed[0])?.line ?? null;
      findings.warning(
        'default-definition-partial',
        line,
        'default_definition',
        '',
        `Some rows of segment "${segment}" name a definition of default and others do not (${unnamed.join(', ')}). Rows without one take the definition given at upload, if any; fill the column on every row to be explicit.`,
      );
    }
  }
}
