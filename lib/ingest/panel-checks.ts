/**
 * Checks on a segment's panel of cohort rows as a whole (after every row passed its own checks),
 * used for uploaded cohort files and for rows converted from vintages or loan tapes.
 *
 * Periods are annual (YYYY). Per segment, in period order:
 * - `period-gap` (warning): a missing year inside an otherwise annual series, reported on the row
 *   after the gap. Estimators treat periods as separate draws, so a gap mostly shortens the panel,
 *   but it breaks the autocorrelation diagnostics and may mean missing data.
 * - `irregular-spacing` (warning, once per segment): most steps between periods are longer than a
 *   year (for example every second year), so the series is not an annual panel.
 * - `few-periods` (warning): fewer than MIN_PERIODS periods; intervals will be very wide.
 * - `tiny-cohort` (warning): obligors < TINY_COHORT; its default rate is mostly binomial noise.
 * - `all-zero-segment` (warning, once): no defaults in any period; only the binomial-mixture
 *   likelihood can say anything, and little.
 * - `obligors-jump` (warning): obligors change by more than a factor JUMP_RATIO between
 *   consecutive periods (a merger, a definition change or a data error).
 */
import { FindingCollector } from './findings';

export const TINY_COHORT = 30;
export const JUMP_RATIO = 3;
export const MIN_PERIODS = 5;

export interface PanelRow {
  segment: string;
  period: string;
  obligors: number;
  defaults: number;
  line: number | null;
}

export function checkPanel(rows: readonly PanelRow[], findings: FindingCollector, source: 'file' | 'converted'): void {
  const bySegment = new Map<string, PanelRow[]>();
  for (const r of rows) {
    let list = bySegment.get(r.segment);
    if (!list) bySegment.set(r.segment, (list = []));
    list.push(r);
  }
  const where = (r: PanelRow) => (source === 'file' ? `line ${r.line}` : `the converted cohort ${r.period}`);
  for (const [segment, list] of bySegment) {
    list.sort((a, b) => Number(a.period) - Number(b.period));
    const first = list[0];
    if (list.length < MIN_PERIODS) {
      findings.warning(
        'few-periods',
        first.line,
        'period',
        String(list.length),
        `Segment "${segment}" has only ${list.length} period${list.length === 1 ? '' : 's'}. With fewer than ${MIN_PERIODS} annual observations every correlation estimate is extremely uncertain; add more history if you have it.`,
      );
    }
    const steps: number[] = [];
    for (let i = 1; i < list.length; i++) steps.push(Number(list[i].period) - Number(list[i - 1].period));
    const longSteps = steps.filter((s) => s > 1).length;
    if (steps.length > 0 && longSteps > steps.length / 2) {
      findings.warning(
        'irregular-spacing',
        first.line,
        'period',
        list.map((r) => r.period).join(' '),
        `The periods of segment "${segment}" are not consecutive years (${list.map((r) => r.period).join(', ')}). Rhobook fits annual default rates; upload one row per year.`,
      );
    } else {
      for (let i = 1; i < list.length; i++) {
        const step = steps[i - 1];
        if (step > 1) {
          const a = Number(list[i - 1].period);
          const b = Number(list[i].period);
          const missing = step === 2 ? String(a + 1) : `${a + 1}–${b - 1}`;
          findings.warning(
            'period-gap',
            list[i].line,
            'period',
            list[i].period,
            `Segment "${segment}" has no row for ${missing} (between ${a} and ${b}, at ${where(list[i])}). Add the missing year${step > 2 ? 's' : ''} if the data exists; otherwise the gap is kept and noted.`,
          );
        }
      }
    }
    for (const r of list) {
      if (r.obligors < TINY_COHORT) {
        findings.warning(
          'tiny-cohort',
          r.line,
          'obligors',
          String(r.obligors),
          `Segment "${segment}" has only ${r.obligors} obligors in ${r.period}. A default rate from fewer than ${TINY_COHORT} obligors is mostly noise; consider merging the segment with a similar one.`,
        );
      }
    }
    if (list.every((r) => r.defaults === 0)) {
      findings.warning(
        'all-zero-segment',
        first.line,
        'defaults',
        '0',
        `Segment "${segment}" has no defaults in any period. The moment estimators cannot be used and the likelihood says little about correlation; consider a longer window or a pooled fit with similar segments.`,
      );
    }
    for (let i = 1; i < list.length; i++) {
      const a = list[i - 1].obligors;
      const b = list[i].obligors;
      if (b > JUMP_RATIO * a || a > JUMP_RATIO * b) {
        findings.warning(
          'obligors-jump',
          list[i].line,
          'obligors',
          String(b),
          `In segment "${segment}" obligors go from ${a} in ${list[i - 1].period} to ${b} in ${list[i].period}, a change of more than ${JUMP_RATIO} times. Check for a merger, a change of definition or a data error.`,
        );
      }
    }
  }
}
