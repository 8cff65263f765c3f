/**
 * The version of Rhobook's estimation engine (lib/stats), written into every fit result, the CLI's
 * JSON and each stored assumption, so that a number can be traced to the code that produced it.
 *
 * Bump rule (semantic versioning applied to numbers):
 * - MAJOR: a definition changes (an estimator, an interval method, a diagnostic or a result field
 *   means something else than before), or a field is removed or renamed.
 * - MINOR: any change that can move a number at all, in any digit: a new integration rule or
 *   tolerance, a different optimiser start or grid, a different random stream for the same seed,
 *   a changed default (level, LGD, thresholds of warnings), a bug fix in a formula. Also new fields.
 * - PATCH: changes that cannot move a number: documentation, error messages, speed-ups that are
 *   bit-for-bit identical (checked by re-running the fixtures and the CLI on a reference file).
 * When in doubt, bump MINOR: a stored result claiming a version whose code would now give another
 * value is the failure this constant exists to prevent.
 */
export const ENGINE_VERSION = '3.4.0';
