import { PosteriorSection as Posterior } from '@/components/fits/portfolio-review';
import type { ReviewContext } from './types';
import type { FitSegmentResult } from '@/lib/fits/results';

/** Total defaults of a segment over its window. */
export function totalDefaults(seg: FitSegmentResult): number {
  return seg.observed.reduce((sum, o) => sum + o.defaults, 0);
}

/** The segment has fewer defaults than the setting (LOW_DEFAULT_THRESHOLD): the review leads with the posterior. */
export function isLowDefault(seg: FitSegmentResult, threshold: number): boolean {
  return totalDefaults(seg) < threshold;
}

/** The low-default posterior of rho (prior drawn beside it) and the most prudent PD of the segment. */
export function PosteriorReviewSection({ seg, lowDefaultThreshold }: ReviewContext) {
  return <Posterior posterior={seg.posterior} prudentPd={seg.prudentPd} totalDefaults={totalDefaults(seg)} setting={lowDefaultThreshold} />;
}
