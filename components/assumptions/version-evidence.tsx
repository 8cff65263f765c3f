import Link from 'next/link';
import { SegmentEvidence } from '@/components/fits/review/segment-evidence';
import type { FitSegmentResult } from '@/lib/fits/results';
import { segmentHref } from '@/lib/fits/results';

/**
 * The review of the version's segment from the fit it was drafted on, frozen (a finished run's
 * results are written once and the version keeps the run), so a validator reviews it here.
 */
export function VersionEvidence({
  evidence,
  segment,
  lowDefaultThreshold,
}: {
  evidence: { fitId: number; bootstrapRequested: boolean; segment: FitSegmentResult } | null;
  segment: string;
  /** The setting LOW_DEFAULT_THRESHOLD (lib/env.ts), read by the page. */
  lowDefaultThreshold: number;
}) {
  return (
    <section className="space-y-3" aria-labelledby="evidence-heading" data-testid="version-evidence">
      <div>
        <h2 id="evidence-heading">Evidence: the review of {segment}{evidence ? ` from fit #${evidence.fitId}` : ''}</h2>
        <p className="text-sm text-[var(--color-muted)]">
          {evidence ? (
            <>
              As drafted: the fit&apos;s results do not change once it has finished, and this version keeps the fit. The same review on its
              own page: <Link href={segmentHref(evidence.fitId, segment)}>fit #{evidence.fitId}, {segment}</Link>.
            </>
          ) : (
            'The fit of this version has no review to show here (it was stored in an older layout or has no result for this segment); the values above are the frozen evidence.'
          )}
        </p>
      </div>
      {evidence ? <SegmentEvidence seg={evidence.segment} idPrefix="evidence" bootstrapRequested={evidence.bootstrapRequested} fitId={evidence.fitId} lowDefaultThreshold={lowDefaultThreshold} /> : null}
    </section>
  );
}
