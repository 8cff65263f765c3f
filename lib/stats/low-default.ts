/**
 * What the engine says about a segment with few defaults: the grid posterior of rho under the
 * stated prior with the prior's influence in one sentence, and the most prudent PD. The
 * `posterior` and `prudentPd` blocks of a segment in the engine's JSON (DESIGN.md "Posterior",
 * "Most prudent PD").
 */
import { binomialMle } from './estimators/binomial-mle';
import { rhoPriorLaw, type RhoPriorSpec } from './beta-prior';
import { supervisoryCorrelation, type AssetClass } from './irb';
import type { Panel } from './panel';
import { prudentPd, type PrudentPd } from './prudent-pd';
import { rhoPosterior, type RhoPosterior } from './rho-posterior';

/**
 * Total defaults below which the likelihood estimate is called not informative: the default of the
 * review's setting LOW_DEFAULT_THRESHOLD (lib/env.ts), which the deployment may change.
 */
export const LOW_DEFAULT_THRESHOLD = 20;

/** The PD floor of the IRB approach, used for the supervisory correlation of a segment without defaults (BCBS 2006 para 285). */
const PD_FLOOR = 0.0003;

/** The `posterior` block: DESIGN.md's fields first, then what the review draws and says. */
export type PosteriorBlock =
  | ({ status: 'ok'; median: number; mean: number; lower: number; upper: number; influence: string; flatMedian: number } & Omit<RhoPosterior, 'median' | 'mean' | 'lower' | 'upper'>)
  | { status: 'undefined'; prior: { rho: string; pd: string }; reason: string };

/** The `prudentPd` block. */
export type PrudentPdBlock = (PrudentPd & { status: 'ok' | 'not-converged' }) | { status: 'undefined'; confidence: number; reason: string };

/**
 * The supervisory correlation a `supervisory` prior is centred on: the asset class's formula at
 * the pooled default rate floored at 0.03% (BCBS 2006 paras 272-273, 285, 328-330).
 */
export function supervisoryCentre(panel: Panel, assetClass: AssetClass | null, turnoverMillions: number | null): number | null {
  if (assetClass === null) return null;
  const n = panel.obligors.reduce((s, v) => s + v, 0);
  const d = panel.defaults.reduce((s, v) => s + v, 0);
  return supervisoryCorrelation(assetClass, Math.min(0.999, Math.max(PD_FLOOR, d / n)), turnoverMillions ? { turnoverMillions } : {});
}

/**
 * The posterior block of one segment: rhoPosterior under `prior` (and under the flat prior, for
 * the influence sentence: how far the posterior median moved from the flat-prior one; Tasche
 * 2013 on making the prior's role visible).
 *
 * Special cases: a prior that cannot be formed (zero mass, no asset class for a supervisory
 * prior) gives status `undefined` with the sentence, never NaN.
 *
 * @example posteriorBlock({ obligors: [500, 520], defaults: [0, 1] }, { kind: 'flat' }, { assetClass: null })
 *
 * Reference: Kiefer (2009, 2011); Tasche, D. (2013), Journal of Credit Risk 9(4):63-103.
 */
export function posteriorBlock(
  panel: Panel,
  spec: RhoPriorSpec,
  options: { assetClass: AssetClass | null; turnoverMillions?: number | null; level?: number; pdPrior?: { a: number; b: number } },
): PosteriorBlock {
  const pdLabel = `beta:${options.pdPrior?.a ?? 1},${options.pdPrior?.b ?? 1}`;
  let law;
  try {
    law = rhoPriorLaw(spec, supervisoryCentre(panel, options.assetClass, options.turnoverMillions ?? null));
  } catch (err) {
    if (!(err instanceof RangeError)) throw err;
    return { status: 'undefined', prior: { rho: spec.kind === 'beta' ? `beta:${spec.a},${spec.b}` : spec.kind, pd: pdLabel }, reason: err.message };
  }
  try {
    const common = { level: options.level ?? 0.95, ...(options.pdPrior ? { pdPrior: options.pdPrior } : {}) };
    const post = rhoPosterior(panel, { prior: law, ...common });
    const flat = spec.kind === 'flat' ? post : rhoPosterior(panel, { prior: { a: 1, b: 1, label: 'flat' }, ...common });
    const moved = post.median - flat.median;
    const influence =
      spec.kind === 'flat'
        ? `The prior on rho is flat, so the posterior follows the likelihood; its median is ${post.median.toFixed(3)}.`
        : `The prior ${law.label} (Beta(${+law.a.toFixed(3)}, ${+law.b.toFixed(3)})) moves the posterior median of rho from ${flat.median.toFixed(3)} under a flat prior to ${post.median.toFixed(3)} (${moved >= 0 ? '+' : ''}${moved.toFixed(3)}): ${Math.abs(moved) > 0.25 * (flat.upper - flat.lower) ? 'the prior, not the data, decides much of this value' : 'the data, not the prior, decide most of this value'}.`;
    return { status: 'ok', ...post, influence, flatMedian: flat.median };
  } catch (err) {
    if (!(err instanceof RangeError)) throw err;
    return { status: 'undefined', prior: { rho: law.label, pd: pdLabel }, reason: err.message };
  }
}

/**
 * The prudentPd block: the most prudent PD at `rho` (default: the segment's binomialMle) and
 * `confidence` (default 0.9, DESIGN.md).
 *
 * Special cases: no rho given and no likelihood estimate (a segment without defaults) gives
 * status `undefined` with a sentence asking for one; a segment with more defaults than the bound
 * is meant for (MAX_PRUDENT_DEFAULTS) gives status `undefined` with that sentence.
 *
 * @example prudentPdBlock({ obligors: [400, 420], defaults: [0, 0] }, { rho: 0.12, confidence: 0.9 })
 *
 * Reference: Pluto, K. & Tasche, D. (2005), Risk 18(8):72-78.
 */
export function prudentPdBlock(panel: Panel, options: { rho?: number; confidence?: number } = {}): PrudentPdBlock {
  const confidence = options.confidence ?? 0.9;
  let rho = options.rho;
  if (rho === undefined) {
    const mle = binomialMle(panel);
    if (mle.rho === null || mle.status === 'not-converged') {
      return {
        status: 'undefined',
        confidence,
        reason: `The segment has no likelihood estimate of rho (${mle.reason ?? mle.status}); give the correlation to assume (for example --prudent 0.12,${confidence}).`,
      };
    }
    rho = mle.rho;
  }
  try {
    const r = prudentPd(panel, rho, confidence);
    return { ...r, status: r.converged ? 'ok' : 'not-converged' };
  } catch (err) {
    // Too many defaults for the convolution (the bound is for low-default segments): say so in place.
    if (!(err instanceof RangeError)) throw err;
    return { status: 'undefined', confidence, reason: err.message.replace(/^prudentPd: /, '') };
  }
}
