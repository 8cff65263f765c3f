/**
 * A panel as the likelihoods read it in their inner loops: the counts as Float64Arrays, each
 * period's log binomial coefficient log C(n_t, d_t) (the constant of its binomial probability,
 * computed once) and the pooled default rate sum d_t / sum n_t (the searches' centre).
 *
 * @example panelArrays({ obligors: [100, 200], defaults: [1, 3] }).pooledRate // 4 / 300
 */
import { logBinomialCoefficient } from './log-binomial';
import { assertPanel, type Panel } from './panel';

export interface PanelArrays {
  periods: number;
  obligors: Float64Array;
  defaults: Float64Array;
  logChoose: Float64Array;
  pooledRate: number;
}

/** Checks the panel (assertPanel, naming `fn`) and returns its arrays. */
export function panelArrays(panel: Panel, fn: string): PanelArrays {
  assertPanel(panel, fn);
  const T = panel.obligors.length;
  const obligors = Float64Array.from(panel.obligors);
  const defaults = Float64Array.from(panel.defaults);
  const logChoose = new Float64Array(T);
  let sn = 0;
  let sd = 0;
  for (let t = 0; t < T; t++) {
    logChoose[t] = logBinomialCoefficient(obligors[t], defaults[t]);
    sn += obligors[t];
    sd += defaults[t];
  }
  return { periods: T, obligors, defaults, logChoose, pooledRate: sd / sn };
}
