/**
 * What every mixing law's maximum likelihood asks of a panel before it searches: some defaults but
 * not all (else the mean default rate has no interior maximum), and more than one year (a spread of
 * default rates across years cannot be seen in one). The answer is the pooled default rate, the
 * search's centre, or the sentence that the estimator reports with status `undefined`.
 *
 * @example mixingLawPooledRate({ obligors: [1000, 1000], defaults: [10, 30] }, 'the beta law') // { pooled: 0.02 }
 */
import type { Panel } from '../panel';
import type { EstimateStatus } from './types';

/** A profile-likelihood interval; an end at a bound is that bound. */
export interface ProfileInterval {
  level: number;
  lower: number;
  upper: number;
}

/** What the fit of a mixing law without an asset correlation reports beside its own parameters. */
export interface EquivalentRhoFit {
  /** The mean default rate E[pi]. */
  pd: number | null;
  /** The rho of the Gaussian law with the same p and E[pi^2]. */
  equivalentRho: number | null;
  logLik: number | null;
  status: EstimateStatus;
  reason?: string;
  intervals: { profile: ProfileInterval | null };
}

export function mixingLawPooledRate(panel: Panel, law: string): { pooled: number; reason: null } | { pooled: null; reason: string } {
  let sn = 0;
  let sd = 0;
  for (let t = 0; t < panel.obligors.length; t++) {
    sn += panel.obligors[t];
    sd += panel.defaults[t];
  }
  if (sd === 0) return { pooled: null, reason: `The panel has no defaults: the mean default rate has no interior maximum, so ${law} is not estimated.` };
  if (sd === sn) return { pooled: null, reason: `Every obligor defaulted: the mean default rate has no interior maximum, so ${law} is not estimated.` };
  if (panel.obligors.length < 2) return { pooled: null, reason: `A single year shows no spread of default rates across years, so ${law} cannot be estimated.` };
  return { pooled: sd / sn, reason: null };
}
