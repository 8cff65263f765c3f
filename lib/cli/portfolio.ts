/**
 * The portfolio options of `rhobook fit`: `--group "A,B,C"` (grades under one factor),
 * `--common-window`, `--pairs` (the factor-correlation matrix), `--prior flat|supervisory:S|beta:A,B`
 * (the grid posterior of each segment) and `--prudent RHO,CONFIDENCE` (the most prudent PD), and
 * the JSON blocks they add: `group` and `pairs` beside `segments`, `posterior` and `prudentPd` in
 * each segment.
 */
import { EnginePool, portfolioBlocks as engineBlocks, type PortfolioBlocks } from '../engine';
import type { RhoPriorSpec } from '../stats/beta-prior';
import type { PanelInput } from '../stats/fit-panel';
import type { AssetClass } from '../stats/irb';

/** Parsed portfolio options. */
export interface PortfolioArgs {
  group?: string[];
  commonWindow: boolean;
  pairs: boolean;
  prior?: RhoPriorSpec;
  prudent?: { rho?: number; confidence: number };
}

/** The options parseArgs must know. */
export const PORTFOLIO_OPTIONS = {
  group: { type: 'string' },
  'common-window': { type: 'boolean' },
  pairs: { type: 'boolean' },
  prior: { type: 'string' },
  prudent: { type: 'string' },
} as const;

export const PORTFOLIO_USAGE = `  --group "A,B,C"   fit these segments as grades under one factor (best grade first): common rho with
                    its profile interval, grade PDs with intervals, grade-specific rho, LR test
                    (with --audit R, also the coverage of the common-rho interval at these n_gt and T)
  --common-window   with --group, use the years every grade has instead of refusing different windows
  --pairs           the factor correlation of every pair of segments, with the nearest correlation matrix
  --prior P         grid posterior of rho in each segment: flat, supervisory:STRENGTH (Beta centred on the
                    supervisory rho of --asset-class, a + b = STRENGTH) or beta:A,B
  --prudent R,C     most prudent PD at rho R (or "mle") and confidence C, for example 0.12,0.9 (default mle,0.9)`;

/** Parses the portfolio options; `fail` turns a sentence into the CLI's input error. */
export function parsePortfolioArgs(values: Record<string, unknown>, fail: (message: string) => Error): PortfolioArgs {
  const out: PortfolioArgs = { commonWindow: values['common-window'] === true, pairs: values.pairs === true };
  if (typeof values.group === 'string') {
    const names = values.group.split(',').map((s) => s.trim()).filter((s) => s.length > 0);
    if (names.length < 2) throw fail(`--group needs at least two segment names separated by commas, for example --group "A,B,C"; got "${values.group}".`);
    out.group = names;
  }
  if (out.commonWindow && !out.group) throw fail('--common-window applies to --group; give the grades as well.');
  if (typeof values.prior === 'string') {
    const raw = values.prior.trim();
    const sup = /^supervisory:(.+)$/.exec(raw);
    const beta = /^beta:([^,]+),(.+)$/.exec(raw);
    if (raw === 'flat') out.prior = { kind: 'flat' };
    else if (sup) {
      const strength = Number(sup[1]);
      if (!(strength > 0 && Number.isFinite(strength))) throw fail(`--prior supervisory:STRENGTH needs a positive strength (a + b of the Beta prior), for example supervisory:20; got "${raw}".`);
      out.prior = { kind: 'supervisory', strength };
    } else if (beta) {
      const a = Number(beta[1]);
      const b = Number(beta[2]);
      if (!(a > 0 && b > 0 && Number.isFinite(a) && Number.isFinite(b))) {
        throw fail(`--prior beta:A,B needs A > 0 and B > 0 (a Beta law with A or B at 0 has no mass inside (0, 1)); got "${raw}".`);
      }
      out.prior = { kind: 'beta', a, b };
    } else {
      throw fail(`--prior must be flat, supervisory:STRENGTH or beta:A,B; got "${raw}".`);
    }
  }
  if (typeof values.prudent === 'string') {
    const [r, c] = values.prudent.split(',').map((s) => s.trim());
    const confidence = c === undefined ? 0.9 : Number(c);
    if (!(confidence > 0 && confidence < 1)) throw fail(`--prudent RHO,CONFIDENCE needs a confidence strictly between 0 and 1, for example 0.12,0.9; got "${values.prudent}".`);
    if (r === 'mle' || r === '') out.prudent = { confidence };
    else {
      const rho = Number(r);
      if (!(rho >= 0 && rho < 1)) throw fail(`--prudent RHO,CONFIDENCE needs rho in [0, 1) or "mle", for example 0.12,0.9; got "${values.prudent}".`);
      out.prudent = { rho, confidence };
    }
  }
  return out;
}

/**
 * Computes the portfolio blocks for the file's panels (all segments, within the window), with
 * the CLI's asset class for a supervisory-centred prior.
 */
export async function portfolioBlocks(
  panels: readonly PanelInput[],
  args: PortfolioArgs,
  context: { level: number; assetClass: AssetClass | null; turnoverMillions: number | null; pool?: EnginePool; audit?: { replications: number; seed: number } },
  fail: (message: string) => Error,
): Promise<PortfolioBlocks> {
  if (args.pairs && panels.length < 2) throw fail('--pairs needs a file (or window) with at least two segments.');
  return engineBlocks(
    panels.map((p) => ({ ...p, assetClass: context.assetClass, turnoverMillions: context.turnoverMillions })),
    {
      group: args.group ? { segments: args.group, commonWindow: args.commonWindow } : null,
      pairs: args.pairs,
      prior: args.prior ?? null,
      prudent: args.prudent ? { rho: args.prudent.rho ?? null, confidence: args.prudent.confidence } : null,
      gradeAudit: args.group && context.audit ? context.audit : null,
    },
    { level: context.level, ...(context.pool ? { pool: context.pool } : {}) },
  );
}
