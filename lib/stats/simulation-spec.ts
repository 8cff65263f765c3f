/**
 * The model a parametric simulation draws from: the fitted PD and asset correlation, a master
 * seed, the cohort sizes of the observed panel (one per period), and optionally the factor's AR(1)
 * coefficient phi (0, the independent factor, when absent). Shared by the parametric bootstraps
 * (intervals/bootstrap.ts, intervals/moment-bootstrap.ts), the break test (break-test.ts) and the
 * estimator audit (audit.ts).
 */
export interface SimulationModel {
  pd: number;
  rho: number;
  seed: number;
  obligors: readonly number[];
  /** AR(1) coefficient of the factor, in (-1, 1); absent or 0: independent years. */
  phi?: number;
}

/**
 * Checks a simulation model and throws a RangeError naming the caller and the problem.
 *
 * Special cases: PD must lie strictly in (0, 1) and rho in [0, 1) (the Vasicek model is degenerate
 * outside); phi, when given, in (-1, 1) (at +-1 the factor is not stationary); the seed is a
 * 32-bit unsigned integer (lib/stats/random.ts); every cohort size is a positive whole number.
 */
export function assertSimulationModel(fn: string, spec: SimulationModel): void {
  if (!(spec.pd > 0 && spec.pd < 1)) {
    throw new RangeError(`${fn}: the fitted PD must be strictly between 0 and 1 to simulate from it; got ${spec.pd}.`);
  }
  if (!(spec.rho >= 0 && spec.rho < 1)) {
    throw new RangeError(`${fn}: the fitted rho must be in [0, 1) to simulate from it; got ${spec.rho}.`);
  }
  if (spec.phi !== undefined && !(typeof spec.phi === 'number' && spec.phi > -1 && spec.phi < 1)) {
    throw new RangeError(`${fn}: the factor's autocorrelation phi must be strictly between -1 and 1; got ${spec.phi}.`);
  }
  if (!Number.isInteger(spec.seed) || spec.seed < 0 || spec.seed > 0xffffffff) {
    throw new RangeError(`${fn}: the seed must be an integer from 0 to 4294967295; got ${spec.seed}.`);
  }
  if (!Array.isArray(spec.obligors) || spec.obligors.length === 0) {
    throw new RangeError(`${fn}: the cohort sizes must be a non-empty array.`);
  }
  spec.obligors.forEach((n, t) => {
    if (!Number.isSafeInteger(n) || n < 1) {
      throw new RangeError(`${fn}: period ${t + 1} has obligors = ${n}; it must be a positive whole number.`);
    }
  });
}
