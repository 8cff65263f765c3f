/**
 * The cautions of DESIGN.md that apply to a published correlation assumption; shown on the library
 * screens and carried by every consumer API answer.
 */
export const assumptionCautions: readonly string[] = [
  'The Gaussian one-factor model has no tail dependence and a single constant correlation.',
  '10-25 annual observations give wide intervals and a downward bias in the estimate.',
  'A correlation is valid only with the PD and the definition of default it was fitted on.',
  'Supervisory correlations are policy settings, not estimates.',
  "Approval in Rhobook is neither an independent validation nor a regulator's approval; it does not replace independent model validation, local regulation or licensed professional judgement.",
];
