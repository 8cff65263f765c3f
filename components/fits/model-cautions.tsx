/** The cautions of the model under every fit's numbers, in one paragraph. */
export function ModelCautions() {
  return (
    <p className="notice-caution text-sm" data-testid="model-cautions">
      The Gaussian one-factor model has no tail dependence and one constant correlation; 10–25 yearly observations give wide intervals and a
      downward bias. These numbers support a judgement: they do not replace independent validation, the institution&apos;s model-risk
      policy, supervisory requirements or qualified professional judgement, and approval in Rhobook is not a supervisor&apos;s approval.
    </p>
  );
}
