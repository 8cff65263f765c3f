import type { FitSegmentResult } from '@/lib/fits/results';

/** What every section of a segment's review receives. */
export type ReviewContext = {
  seg: FitSegmentResult;
  /** Prefix of the element ids of this review, unique on the page (a fit's segment page, a version page). */
  idPrefix: string;
  /** Whether the fit asked for the parametric bootstrap (an absent bootstrap interval then needs a reason). */
  bootstrapRequested: boolean;
  /** The fit run the segment belongs to (for links to other screens about it). */
  fitId?: number;
  /** Total defaults below which the review leads with the posterior (the setting LOW_DEFAULT_THRESHOLD). */
  lowDefaultThreshold: number;
};

/**
 * One section of a segment's review: its anchor (`id`, the side index links to `#<idPrefix>-<id>`),
 * its heading, the component drawing it, and optionally when it applies (default: always).
 */
export type ReviewSection = {
  id: string;
  title: string;
  Component: (props: ReviewContext) => React.ReactNode;
  applies?: (ctx: ReviewContext) => boolean;
};
