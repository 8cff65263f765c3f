import { PosteriorSection as Posterior } from '@/components/fits/portfolio-review';
import type { ReviewContext } from './types';
import type { FitSegmentResult } from '@/lib/fits/results';
import { LOW_DEFAULT_THRESHOLD } from '@/lib/stats/low-default';

/** Total defaults of a segment over its window. */
export function totalDefaults(seg: FitSegmentResult): number {
  return seg.observed.reduce((sum, o) => sum + o.defaults, 0);
}

/** The segment has fewer defaults than the setting: the review leads with the posterior. */
export function isLowDefault(seg: FitSegmentResult): boolean {
  return totalDefaults(seg) < LOW_DEFAULT_THRESHOLD;
}

/** The low-default posterior of rho (prior drawn beside it) and the most prudent PD of the segment. */
export function PosteriorReviewSection({ seg }: ReviewContext) {
  return <Posterior posterior={seg.posterior} prudentPd={seg.prudentPd} totalDefaults={totalDefaults(seg)} setting={LOW_DEFAULT_THRESHOLD} />;
}
