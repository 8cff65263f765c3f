import type { FitSegmentResult } from '@/lib/fits/results';
import { SectionFrame } from './section-frame';
import { REVIEW_SECTIONS } from './sections';
import { SegmentSummary } from './summary';

/**
 * A segment's whole review: its summary with the cautions beside the value, a side index of the
 * sections (sticky on wide screens, a row of links on narrow ones) and the sections themselves.
 * Used by a fit's segment page and, frozen, by an assumption version's page.
 */
export function SegmentEvidence({
  seg,
  idPrefix,
  bootstrapRequested,
  fitId,
  lowDefaultThreshold,
}: {
  seg: FitSegmentResult;
  idPrefix: string;
  bootstrapRequested: boolean;
  fitId?: number;
  /** The setting LOW_DEFAULT_THRESHOLD (lib/env.ts), read by the page. */
  lowDefaultThreshold: number;
}) {
  const ctx = { seg, idPrefix, bootstrapRequested, fitId, lowDefaultThreshold };
  const sections = REVIEW_SECTIONS.filter((s) => !s.applies || s.applies(ctx));
  return (
    <div className="grid gap-4 lg:grid-cols-[13rem_minmax(0,1fr)]" data-testid="segment-review">
      <nav aria-label="Sections of this review" className="lg:sticky lg:top-4 lg:self-start">
        <ol className="flex flex-wrap gap-x-3 gap-y-1 text-sm lg:flex-col lg:gap-1 lg:border-l lg:border-[var(--color-line)] lg:pl-3">
          {sections.map((s) => (
            <li key={s.id}>
              <a href={`#${idPrefix}-${s.id}`}>{s.title}</a>
            </li>
          ))}
        </ol>
      </nav>
      <div className="min-w-0 space-y-4">
        <SegmentSummary seg={seg} />
        {sections.map((s) => (
          <SectionFrame key={s.id} section={s} ctx={ctx} />
        ))}
      </div>
    </div>
  );
}
