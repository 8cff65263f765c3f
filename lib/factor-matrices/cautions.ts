import { DEFERRAL } from '@/lib/assumptions/cautions';

/**
 * The cautions that travel with a factor-correlation matrix: on its version page, in the consumer
 * API's answers and as comment lines of its CSV.
 */
export const matrixCautions: readonly string[] = [
  'A factor correlation estimated from T yearly observations is imprecise: with 10-25 years its interval is wide (read each pair’s interval, not only r), and pairs estimated on different common windows carry different information.',
  'Each pair is estimated on its own (margins first, then r); the pairwise estimates need not form a valid correlation matrix, and where they do not the value starts from the nearest correlation matrix (Higham 2002), which changes the estimates.',
  'The matrix is an input to portfolio and economic-capital models, not to Pillar 1 own-funds requirements: the IRB risk-weight functions have one systematic factor and set the correlation themselves.',
  'The matrix is valid only with the segments’ PDs, definitions of default and the Gaussian factor model it was fitted under.',
  `Approval in Rhobook is neither an independent validation nor a supervisor's approval. ${DEFERRAL}`,
];

/**
 * Why the margin may only raise correlations: a higher factor correlation between segments means
 * less diversification between them and a fatter tail of the portfolio's loss, so for a portfolio
 * that is long credit risk in every segment an increase is the conservative direction (common practice).
 */
export const MARGIN_DIRECTION =
  'A margin may only raise the correlations: higher factor correlations mean less diversification between the segments and a fatter loss tail, so for a portfolio that holds credit risk in every segment an increase is the conservative direction.';

/** The refusal of a negative margin, at its field (the reason is MARGIN_DIRECTION, shown above the form). */
export const NEGATIVE_MARGIN = 'The margin must be 0 or more: the conservative direction for a factor correlation is an increase.';
