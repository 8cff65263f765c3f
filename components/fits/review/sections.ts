import { BandsSection } from './bands-section';
import { DataSection } from './data-section';
import { EstimatesSection } from './estimates-section';
import { FactorSection } from './factor-section';
import { ImplicationsSection } from './implications-section';
import { MixingLawsSection } from './mixing-laws-section';
import { ModelsSection } from './models-section';
import { isLowDefault, PosteriorReviewSection } from './posterior-section';
import { ProfileSection } from './profile-section';
import { SimulationSection } from './simulation-section';
import { StabilitySection } from './stability-section';
import type { ReviewSection } from './types';
import { WindowsSection } from './windows-section';

/**
 * The sections of a segment's review, in the order of the page and its side index. Adding a section
 * is one entry here: a component taking ReviewContext (types.ts), an anchor id and a heading, and
 * optionally `applies` (given the same context) for results that may not carry its part.
 */
export const REVIEW_SECTIONS: readonly ReviewSection[] = [
  // With fewer defaults than the setting the likelihood estimate is not informative: the posterior leads.
  {
    id: 'posterior-first',
    title: 'Posterior of ρ (few defaults)',
    Component: PosteriorReviewSection,
    applies: ({ seg, lowDefaultThreshold }) => (seg.posterior !== undefined || seg.prudentPd !== undefined) && isLowDefault(seg, lowDefaultThreshold),
  },
  { id: 'estimates', title: 'Estimates and intervals', Component: EstimatesSection },
  { id: 'models', title: 'Independent years and a persistent factor', Component: ModelsSection, applies: ({ seg }) => seg.estimates.ar1Mle !== undefined },
  { id: 'mixing-laws', title: 'Mixing laws: the Gaussian copula challenged', Component: MixingLawsSection, applies: ({ seg }) => seg.modelComparison !== undefined },
  { id: 'stability', title: 'Stability across the window', Component: StabilitySection, applies: ({ seg }) => !!seg.stability },
  { id: 'bands', title: 'Default rates against the fitted model', Component: BandsSection },
  { id: 'profile', title: 'Profile log-likelihood of ρ', Component: ProfileSection },
  { id: 'factor', title: 'Implied factor and probability integral transform', Component: FactorSection },
  { id: 'simulation', title: 'Small-sample simulation study', Component: SimulationSection },
  { id: 'implications', title: 'What the estimate means', Component: ImplicationsSection },
  { id: 'windows', title: 'Window comparison', Component: WindowsSection },
  {
    id: 'posterior',
    title: 'Posterior of ρ and the most prudent PD',
    Component: PosteriorReviewSection,
    applies: ({ seg, lowDefaultThreshold }) => (seg.posterior !== undefined || seg.prudentPd !== undefined) && !isLowDefault(seg, lowDefaultThreshold),
  },
  { id: 'data', title: 'The data, period by period', Component: DataSection },
];
