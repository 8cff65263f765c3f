/**
 * Time per stage of a computation (the `timing.stages` of a segment fit), with the clock injected
 * so that lib/stats reads no clock of its own: without one, stages run untimed.
 */

/** Milliseconds per stage, in the order the stages first ran. */
export type StageTimes = Record<string, number>;

/**
 * Adds up the time spent in named stages.
 *
 * Method: `time(stage, fn)` reads the clock before and after fn and adds the difference to the
 * stage (a stage run twice, such as a search restarted, sums); a nested `time` counts in both
 * stages. Without a clock it only runs fn and records nothing.
 *
 * @example const timer = new StageTimer(() => performance.now()); timer.time('vasicekMle', () => vasicekMle(panel)); timer.stages // { vasicekMle: 0.02 }
 */
export class StageTimer {
  private readonly clock: (() => number) | null;
  private readonly times: StageTimes = {};

  constructor(clock?: () => number) {
    this.clock = clock ?? null;
  }

  /** Runs fn and adds its duration to `stage`. */
  time<T>(stage: string, fn: () => T): T {
    if (this.clock === null) return fn();
    const t0 = this.clock();
    try {
      return fn();
    } finally {
      this.add(stage, this.clock() - t0);
    }
  }

  /** Adds ms to a stage (for stages timed elsewhere, such as replications on worker threads). */
  add(stage: string, ms: number): void {
    if (this.clock === null) return;
    if (!(ms >= 0) || !Number.isFinite(ms)) throw new RangeError(`StageTimer.add: a duration must be a finite number of ms >= 0; got ${ms} for ${stage}.`);
    this.times[stage] = (this.times[stage] ?? 0) + ms;
  }

  /** A copy of the times so far; {} without a clock. */
  get stages(): StageTimes {
    return { ...this.times };
  }
}
