/**
 * The portfolio options of `rhobook fit`: `--group "A,B,C"` (grades under one factor),
 * `--common-window`, `--pairs` (the factor-correlation matrix), `--prior flat|supervisory:S|beta:A,B`
 * (the grid posterior of each segment) and `--prudent RHO,CONFIDENCE` (the most prudent PD), and
 * the JSON blocks they add: `group` and `pairs` beside `segments`, `posterior` and `prudentPd` in
 * each segment.
 */
import { EnginePool, factorCorrelationMatrixParallel } from '../engine';
import type { RhoPriorSpec } from '../stats/beta-prior';
import type { FactorCorrelationMatrix } from '../stats/factor-correlation-matrix';
import type { PanelInput } from '../stats/fit-panel';
import { fitGrades, type GradeFit } from '../stats/grade-fit';
import type { AssetClass } from '../stats/irb';
import { posteriorBlock, prudentPdBlock, type PosteriorBlock, type PrudentPdBlock } from '../stats/low-default';

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

/** The blocks the portfolio options add to the document. */
export interface PortfolioBlocks {
  group?: GradeFit;
  pairs?: FactorCorrelationMatrix;
  /** Per segment name. */
  posterior: Map<string, PosteriorBlock>;
  prudentPd: Map<string, PrudentPdBlock>;
}

/**
 * Computes the portfolio blocks for the file's panels (all segments, within the window).
 * Throws `fail(sentence)` for a --group naming a segment the file does not have.
 */
export async function portfolioBlocks(
  panels: readonly PanelInput[],
  args: PortfolioArgs,
  context: { level: number; assetClass: AssetClass | null; turnoverMillions: number | null; pool?: EnginePool },
  fail: (message: string) => Error,
): Promise<PortfolioBlocks> {
  const out: PortfolioBlocks = { posterior: new Map(), prudentPd: new Map() };
  if (args.group) {
    const byName = new Map(panels.map((p) => [p.segment, p]));
    const missing = args.group.filter((g) => !byName.has(g));
    if (missing.length > 0) throw fail(`--group names ${missing.map((m) => `"${m}"`).join(', ')}, which the file (in the window) does not have. Its segments: ${panels.map((p) => `"${p.segment}"`).join(', ')}.`);
    out.group = fitGrades(args.group.map((g) => byName.get(g)!), { level: context.level, commonWindow: args.commonWindow });
  }
  if (args.pairs) {
    if (panels.length < 2) throw fail('--pairs needs a file (or window) with at least two segments.');
    out.pairs = await factorCorrelationMatrixParallel(panels, { level: context.level }, context.pool ? { pool: context.pool } : { threads: 0 });
  }
  for (const p of panels) {
    const panel = { obligors: p.obligors, defaults: p.defaults };
    if (args.prior) out.posterior.set(p.segment, posteriorBlock(panel, args.prior, { assetClass: context.assetClass, turnoverMillions: context.turnoverMillions, level: context.level }));
    if (args.prudent) out.prudentPd.set(p.segment, prudentPdBlock(panel, args.prudent));
  }
  return out;
}
