/**
 * The units of work the engine's worker threads run: a slice [from, to) of the replications of a
 * parametric bootstrap (binomialMle's or a moment estimator's), of the break test's bootstrap or of
 * an estimator audit (a segment's or a grade model's), or of the pairs of a factor-correlation
 * matrix (and, before them, the margins the pairs share). A task is plain data (structured-clone safe) and runTask is the only code that
 * executes it, in a worker thread or in the calling thread alike, so every split of the index
 * range gives the same numbers.
 */
import { copulaBootstrapRange, copulaPowerRange, type CopulaLrReplication, type CopulaPowerSpec, type CopulaTestSpec } from '../stats/copula-lr-test';
import { auditRange, type AuditReplication, type AuditSpec } from '../stats/audit';
import { factorCorrelation, pairMargin, type FactorCorrelation, type PairMargin, type PairSegmentInput } from '../stats/factor-correlation';
import { gradeAuditRange, type GradeAuditReplication, type GradeAuditSpec } from '../stats/grade-audit';
import { bootstrapRange, type BootstrapReplication, type BootstrapSpec } from '../stats/intervals/bootstrap';
import { momentBootstrapRange, type MomentBootstrapReplication, type MomentBootstrapSpec } from '../stats/intervals/moment-bootstrap';
import type { SimulationModel } from '../stats/simulation-spec';
import { breakTestRange, type BreakReplication } from '../stats/stability/break-test';

/** Bootstrap replications from .. to - 1 of one spec. */
export interface BootstrapTask {
  kind: 'bootstrap';
  spec: BootstrapSpec;
  from: number;
  to: number;
}

/** Estimator-audit replications from .. to - 1 of one spec (lib/stats/audit.ts). */
export interface AuditTask {
  kind: 'audit';
  spec: AuditSpec;
  from: number;
  to: number;
}

/** Factor correlations of the pairs from .. to - 1 of a list of segment pairs (lib/stats/factor-correlation.ts). */
export interface PairsTask {
  kind: 'pairs';
  segments: PairSegmentInput[];
  /** Index pairs (i, j) into `segments`. */
  pairs: [number, number][];
  level: number;
  from: number;
  to: number;
  /** Each pair's two margins when computed beforehand (a 'margins' task), by pair index. */
  margins?: (readonly [PairMargin, PairMargin] | null)[];
}

/** The margins (binomialMle on a window) of the items from .. to - 1: segment index and the window's years. */
export interface MarginsTask {
  kind: 'margins';
  segments: PairSegmentInput[];
  items: { segment: number; periods: string[] }[];
  from: number;
  to: number;
}

/** Moment-bootstrap replications from .. to - 1 of one spec (lib/stats/intervals/moment-bootstrap.ts). */
export interface MomentBootstrapTask {
  kind: 'moment-bootstrap';
  spec: MomentBootstrapSpec;
  from: number;
  to: number;
}

/** Grade-model audit replications from .. to - 1 (lib/stats/grade-audit.ts). */
export interface GradeAuditTask {
  kind: 'grade-audit';
  spec: GradeAuditSpec;
  from: number;
  to: number;
}

/** Break-test bootstrap replications from .. to - 1 under the no-break model (lib/stats/stability/break-test.ts). */
export interface BreakTestTask {
  kind: 'break-test';
  spec: SimulationModel;
  from: number;
  to: number;
}

/** Replications from .. to - 1 of the LR test of the Gaussian copula (its bootstrap) or of its power study (lib/stats/copula-lr-test.ts). */
export type CopulaTask =
  | { kind: 'copula-bootstrap'; spec: CopulaTestSpec; from: number; to: number }
  | { kind: 'copula-power'; spec: CopulaPowerSpec; from: number; to: number };

export type EngineTask = CopulaTask | BootstrapTask | AuditTask | PairsTask | MarginsTask | GradeAuditTask | MomentBootstrapTask | BreakTestTask;

export interface BootstrapTaskResult {
  kind: 'bootstrap';
  replications: BootstrapReplication[];
}

export interface AuditTaskResult {
  kind: 'audit';
  replications: AuditReplication[];
}

export interface PairsTaskResult {
  kind: 'pairs';
  entries: FactorCorrelation[];
}

export interface MarginsTaskResult {
  kind: 'margins';
  margins: PairMargin[];
}

export interface GradeAuditTaskResult {
  kind: 'grade-audit';
  replications: GradeAuditReplication[];
}

export interface MomentBootstrapTaskResult {
  kind: 'moment-bootstrap';
  replications: MomentBootstrapReplication[];
}

export interface BreakTestTaskResult {
  kind: 'break-test';
  replications: BreakReplication[];
}

export interface CopulaTaskResult {
  kind: 'copula-bootstrap' | 'copula-power';
  replications: CopulaLrReplication[];
}

export type EngineTaskResult =
  | CopulaTaskResult
  | BootstrapTaskResult
  | AuditTaskResult
  | PairsTaskResult
  | MarginsTaskResult
  | GradeAuditTaskResult
  | MomentBootstrapTaskResult
  | BreakTestTaskResult;

/** Number of replications (progress units) in a task. */
export function taskSize(task: EngineTask): number {
  return task.to - task.from;
}

/** Runs one task; `onItem` is called after each replication (for progress). */
export function runTask(task: EngineTask, onItem?: () => void): EngineTaskResult {
  switch (task.kind) {
    case 'bootstrap':
      return { kind: 'bootstrap', replications: bootstrapRange(task.spec, task.from, task.to, onItem && (() => onItem())) };
    case 'audit':
      return { kind: 'audit', replications: auditRange(task.spec, task.from, task.to, onItem && (() => onItem())) };
    case 'pairs': {
      const entries: FactorCorrelation[] = [];
      for (let i = task.from; i < task.to; i++) {
        const [a, b] = task.pairs[i];
        const margins = task.margins?.[i];
        entries.push(factorCorrelation(task.segments[a], task.segments[b], { level: task.level, ...(margins ? { margins: { a: margins[0], b: margins[1] } } : {}) }));
        onItem?.();
      }
      return { kind: 'pairs', entries };
    }
    case 'margins': {
      const margins: PairMargin[] = [];
      for (let i = task.from; i < task.to; i++) {
        const { segment, periods } = task.items[i];
        const s = task.segments[segment];
        const at = new Map(s.periods.map((p, t) => [String(p), t]));
        const rows = periods.map((p) => at.get(p)!);
        margins.push(pairMargin(s.segment, { obligors: rows.map((t) => s.obligors[t]), defaults: rows.map((t) => s.defaults[t]) }, periods));
        onItem?.();
      }
      return { kind: 'margins', margins };
    }
    case 'grade-audit':
      return { kind: 'grade-audit', replications: gradeAuditRange(task.spec, task.from, task.to, onItem && (() => onItem())) };
    case 'moment-bootstrap':
      return { kind: 'moment-bootstrap', replications: momentBootstrapRange(task.spec, task.from, task.to, onItem && (() => onItem())) };
    case 'break-test':
      return { kind: 'break-test', replications: breakTestRange(task.spec, task.from, task.to, onItem && (() => onItem())) };
    case 'copula-bootstrap':
      return { kind: 'copula-bootstrap', replications: copulaBootstrapRange(task.spec, task.from, task.to, onItem && (() => onItem())) };
    case 'copula-power':
      return { kind: 'copula-power', replications: copulaPowerRange(task.spec, task.from, task.to, onItem && (() => onItem())) };
    default: {
      const unknown: never = task;
      throw new RangeError(`runTask: unknown task kind ${String((unknown as { kind: unknown }).kind)}.`);
    }
  }
}

/** Splits [0, total) into consecutive slices of at most `size` indices. */
export function splitRange(total: number, size: number): { from: number; to: number }[] {
  if (!Number.isInteger(total) || total < 0) throw new RangeError(`splitRange: total must be a whole number >= 0; got ${total}.`);
  if (!Number.isInteger(size) || size < 1) throw new RangeError(`splitRange: size must be a whole number >= 1; got ${size}.`);
  const out: { from: number; to: number }[] = [];
  for (let from = 0; from < total; from += size) out.push({ from, to: Math.min(total, from + size) });
  return out;
}
