/**
 * The cautions of DESIGN.md that travel with every correlation Rhobook shows or hands on: the one
 * list the screens (library, version page, draft form, compare, fit pages), the consumer API, both
 * library CSV exports and the CLI's output (text and JSON) take them from.
 */

export type Caution = { id: string; text: string };

/** The deferral, worded for the trade: said wherever the tool's numbers may be taken as a decision. */
export const DEFERRAL =
  "Rhobook does not replace independent validation, the institution's model-risk policy, supervisory requirements or qualified professional judgement.";

export const CAUTIONS: readonly Caution[] = [
  { id: 'tail-dependence', text: 'The Gaussian one-factor model has no tail dependence and a single constant correlation.' },
  { id: 'short-history', text: '10-25 annual observations give wide intervals and a downward bias in the estimate.' },
  { id: 'pd-and-definition', text: 'A correlation is valid only with the PD and the definition of default it was fitted on.' },
  { id: 'supervisory-policy', text: 'Supervisory correlations are policy settings, not estimates.' },
  {
    id: 'not-pillar-1',
    text: 'An estimated correlation does not replace the supervisory correlation in Pillar 1 own-funds requirements: the IRB risk-weight functions set it.',
  },
  {
    id: 'illustrative-capital',
    text: 'Capital K shown beside a correlation is an illustration at the LGD and maturity stated with it, not regulatory capital.',
  },
  { id: 'not-validation', text: `Approval in Rhobook is neither an independent validation nor a supervisor's approval. ${DEFERRAL}` },
];

/** The cautions as sentences, in order (API answers, CSV comment lines, CLI output). */
export const assumptionCautions: readonly string[] = CAUTIONS.map((c) => c.text);

/**
 * The caution beside a capital figure, with its LGD and maturity stated: "K at LGD 45%, no maturity
 * adjustment, is an illustration, not regulatory capital; ...".
 */
export function capitalCaution(lgd: number, maturityYears: number | null): string {
  const lgdText = `${Number((lgd * 100).toFixed(2))}%`;
  const maturity = maturityYears === null ? 'no maturity adjustment' : `maturity ${maturityYears} years`;
  return `K at LGD ${lgdText} and ${maturity} is an illustration, not regulatory capital; an estimated correlation does not replace the supervisory correlation in Pillar 1 own-funds requirements.`;
}
