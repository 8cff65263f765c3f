/**
 * The warm starts of a panel's per-period integrals, shared by every likelihood that integrates a
 * log-concave integrand once per period (the Gaussian mixture, the t copula, logit-normal mixing,
 * grades under one factor, pairs of segments): each period's last mode and the truncation
 * half-widths left and right of it, kept between calls so that a likelihood evaluated at nearby
 * parameters (an optimiser's steps, a profile) starts each mode search where the last one ended.
 * It also counts the integrals whose error estimate stayed above the tolerance and keeps the worst
 * relative error among them, so that a caller can report them instead of passing over them.
 *
 * A warm start changes where the search starts, not what it finds: the integrator checks its
 * bracket and restarts cold when the warm start fails (lib/stats/log-concave-integral.ts).
 *
 * @example
 * const warm = new PeriodWarmStarts(T);
 * const r = integrator.integrate(f, warm.options(t, { curvatureBound: 1 }));
 * warm.record(t, r, () => `the integral of period ${t + 1} failed: ${r.reason}`);
 */
import type { LogConcaveIntegral, LogConcaveOptions } from './log-concave-integral';

export class PeriodWarmStarts {
  private readonly modes: Float64Array;
  private readonly widths: Float64Array;
  private readonly has: Uint8Array;
  /** Integrals whose error estimate stayed above the tolerance (their value is finite and used). */
  unconverged = 0;
  /** The largest relative error estimate among them. */
  worstRelativeError = 0;

  constructor(periods: number) {
    this.modes = new Float64Array(periods);
    this.widths = new Float64Array(2 * periods);
    this.has = new Uint8Array(periods);
  }

  /** The integrator's options for period t: `base`, plus the warm start of its last result when there is one. */
  options(t: number, base: LogConcaveOptions): LogConcaveOptions {
    if (this.has[t] !== 1) return base;
    return { ...base, start: this.modes[t], leftWidth: this.widths[2 * t], rightWidth: this.widths[2 * t + 1] };
  }

  /**
   * The same as {@link options}, written into `out` (whose curvature bound, limits and tolerances
   * the caller set once): no object is made per integral in a likelihood's inner loop.
   */
  optionsInto(t: number, out: LogConcaveOptions): LogConcaveOptions {
    const warm = this.has[t] === 1;
    out.start = warm ? this.modes[t] : undefined;
    out.leftWidth = warm ? this.widths[2 * t] : undefined;
    out.rightWidth = warm ? this.widths[2 * t + 1] : undefined;
    return out;
  }

  /**
   * Keeps period t's result as its next warm start. A result whose value is not finite forgets the
   * period's warm start and throws a RangeError with the caller's sentence; a finite result above
   * the tolerance is counted in `unconverged`.
   */
  record(t: number, r: LogConcaveIntegral, failure: () => string): void {
    if (!r.converged) {
      if (!Number.isFinite(r.value)) {
        this.has[t] = 0;
        throw new RangeError(failure());
      }
      this.unconverged++;
      if (r.relativeError > this.worstRelativeError) this.worstRelativeError = r.relativeError;
    }
    this.modes[t] = r.mode;
    this.widths[2 * t] = r.leftWidth;
    this.widths[2 * t + 1] = r.rightWidth;
    this.has[t] = 1;
  }

  /** Forgets every warm start (a jump in a parameter that moves the modes far). */
  forget(): void {
    this.has.fill(0);
  }
}
