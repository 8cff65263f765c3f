/**
 * The JSON document of `fit --json` (lib/cli/fit.ts builds it, lib/cli/format.ts writes it as text).
 */
import type { SegmentFailure, TimedSegmentFit } from '../stats/fit-panel';
import type { GradeFit } from '../stats/grade-fit';
import type { GradeAuditSummary } from '../stats/grade-audit';
import type { FactorCorrelationMatrix } from '../stats/factor-correlation-matrix';
import type { PosteriorBlock, PrudentPdBlock } from '../stats/low-default';

/** The JSON document printed with --json: the fitted segments and, in their places, the failed ones. */
export interface FitDocument {
  engine: { version: string };
  segments: (TimedSegmentFit & { posterior?: PosteriorBlock; prudentPd?: PrudentPdBlock })[];
  /** Grades under one factor (--group). */
  group?: GradeFit & { estimatorAudit?: GradeAuditSummary | null };
  /** The factor-correlation matrix (--pairs). */
  pairs?: FactorCorrelationMatrix;
  /** Segments whose fit failed, with the reason and their position among all segments (exit code 3). */
  failures: SegmentFailure[];
  /** The cautions that travel with every correlation (lib/assumptions/cautions.ts). */
  cautions: readonly string[];
}
