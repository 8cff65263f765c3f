/**
 * The portfolio blocks of a fit (grades under one factor, the factor-correlation matrix, each
 * segment's grid posterior and most prudent PD) for the CLI and the fit job alike. The pairs run
 * on the engine's worker threads when a pool is given.
 */
import type { RhoPriorSpec } from '../stats/beta-prior';
import type { FactorCorrelationMatrix } from '../stats/factor-correlation-matrix';
import type { PanelInput } from '../stats/fit-panel';
import { fitGrades, type GradeFit } from '../stats/grade-fit';
import type { AssetClass } from '../stats/irb';
import { posteriorBlock, prudentPdBlock, type PosteriorBlock, type PrudentPdBlock } from '../stats/low-default';
import { mergeGradeAudit, type GradeAuditReplication, type GradeAuditSummary } from '../stats/grade-audit';
import { factorCorrelationMatrixParallel } from './pairs-parallel';
import type { EnginePool } from './pool';
import { runTask, splitRange, type EngineTask } from './tasks';

/** What to compute beyond the segment fits. */
export interface PortfolioRequest {
  /** Segments to fit as grades under one factor, best first. */
  group?: { segments: string[]; commonWindow: boolean } | null;
  /** The factor-correlation matrix of all segments. */
  pairs?: boolean;
  /** Prior of the grid posterior of each segment. */
  prior?: RhoPriorSpec | null;
  /** Most prudent PD: rho (null: the segment's binomialMle) and confidence. */
  prudent?: { rho: number | null; confidence: number } | null;
  /** The estimator audit of the grade model: R groups simulated at the fit (lib/stats/grade-audit.ts). */
  gradeAudit?: { replications: number; seed: number } | null;
}

/** A segment's panel with its supervisory benchmark (for a supervisory-centred prior). */
export type PortfolioPanel = PanelInput & { assetClass: AssetClass | null; turnoverMillions: number | null };

/** The blocks computed (absent when not asked for). */
export interface PortfolioBlocks {
  group?: GradeFit & { estimatorAudit?: GradeAuditSummary | null };
  pairs?: FactorCorrelationMatrix;
  posterior: Map<string, PosteriorBlock>;
  prudentPd: Map<string, PrudentPdBlock>;
}

/**
 * Computes the blocks asked for in `request` on the panels. A group naming a segment that is not
 * among the panels gives the group status `undefined` with a sentence; fewer than two panels for
 * the pairs gives no matrix and throws RangeError with a sentence.
 *
 * @example await portfolioBlocks(panels, { group: { segments: ['A', 'B'], commonWindow: false } }, { level: 0.95 })
 */
export async function portfolioBlocks(
  panels: readonly PortfolioPanel[],
  request: PortfolioRequest,
  context: { level: number; pool?: EnginePool; onProgress?: (pct: number, message: string) => void | Promise<void>; signal?: AbortSignal },
): Promise<PortfolioBlocks> {
  const out: PortfolioBlocks = { posterior: new Map(), prudentPd: new Map() };
  if (request.group) {
    const byName = new Map(panels.map((p) => [p.segment, p]));
    const missing = request.group.segments.filter((g) => !byName.has(g));
    out.group =
      missing.length > 0
        ? {
            ...fitGrades([], { level: context.level }),
            segments: request.group.segments,
            reason: `The group names ${missing.map((m) => `"${m}"`).join(', ')}, which the fitted segments do not include.`,
          }
        : fitGrades(request.group.segments.map((g) => byName.get(g)!), { level: context.level, commonWindow: request.group.commonWindow });
    const fit = out.group;
    if (request.gradeAudit && fit.commonRho && fit.pds) {
      const spec = {
        obligors: fit.segments.map((s) => {
          const p = byName.get(s)!;
          return fit.periods.map((y) => p.obligors[p.periods.indexOf(y)]);
        }),
        pds: fit.segments.map((s) => fit.pds![s].pd),
        rho: fit.commonRho.rho,
        seed: request.gradeAudit.seed,
        level: context.level,
      };
      const tasks: EngineTask[] = splitRange(request.gradeAudit.replications, 5).map(({ from, to }) => ({ kind: 'grade-audit', spec, from, to }));
      const results = context.pool ? await context.pool.run(tasks, context.signal ? { signal: context.signal } : {}) : tasks.map((t) => runTask(t));
      const reps: GradeAuditReplication[] = [];
      for (const r of results) if (r.kind === 'grade-audit') reps.push(...r.replications);
      out.group = { ...fit, estimatorAudit: mergeGradeAudit([reps], spec) };
    }
  }
  if (request.pairs) {
    if (panels.length < 2) throw new RangeError('The factor-correlation matrix needs at least two segments.');
    out.pairs = await factorCorrelationMatrixParallel(panels, { level: context.level }, {
      ...(context.pool ? { pool: context.pool } : { threads: 0 }),
      ...(context.onProgress ? { onProgress: context.onProgress } : {}),
      ...(context.signal ? { signal: context.signal } : {}),
    });
  }
  for (const p of panels) {
    const panel = { obligors: p.obligors, defaults: p.defaults };
    if (request.prior) {
      out.posterior.set(p.segment, posteriorBlock(panel, request.prior, { assetClass: p.assetClass, turnoverMillions: p.turnoverMillions, level: context.level }));
    }
    if (request.prudent) {
      out.prudentPd.set(p.segment, prudentPdBlock(panel, { ...(request.prudent.rho === null ? {} : { rho: request.prudent.rho }), confidence: request.prudent.confidence }));
    }
  }
  return out;
}
