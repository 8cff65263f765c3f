/**
 * Margin of conservatism arithmetic. The three parts (data and method deficiencies; changes in
 * lending or recovery practice; general estimation error) are added to the estimate on the
 * correlation scale: conservative value = estimate + data + practice + general. The final value
 * may be rounded up from it but never set below it (that would undo the margins), and stays in
 * [0, 1).
 */
export type Margins = { data: number; practice: number; general: number };

/** Rounds away floating noise so that 0.1 + 0.02 is 0.12 (correlations are quoted to 1e-6 at most). */
function clean(x: number): number {
  return Math.round(x * 1e10) / 1e10;
}

export function conservativeValue(estimate: number, m: Margins): number {
  return clean(estimate + m.data + m.practice + m.general);
}

/** Problems with the margins and the final value, each naming the field. */
export function marginProblems(estimate: number, m: Margins, finalValue: number): { field: string; message: string }[] {
  const out: { field: string; message: string }[] = [];
  for (const [k, label] of [
    ['data', 'data and method deficiencies'],
    ['practice', 'changes in lending or recovery practice'],
    ['general', 'general estimation error'],
  ] as const) {
    const v = m[k];
    if (!Number.isFinite(v) || v < 0) out.push({ field: `margins.${k}.value`, message: `The margin for ${label} must be a number of 0 or more.` });
    else if (v >= 1) out.push({ field: `margins.${k}.value`, message: `The margin for ${label} is on the correlation scale and must be below 1.` });
  }
  if (out.length) return out;
  const cons = conservativeValue(estimate, m);
  if (cons >= 1) out.push({ field: 'margins', message: `The estimate plus the margins is ${cons}, at or above 1: a correlation must stay below 1.` });
  if (!Number.isFinite(finalValue) || finalValue < 0 || finalValue >= 1) {
    out.push({ field: 'finalValue', message: 'The final value is a correlation: give a number from 0 up to (not including) 1.' });
  } else if (clean(finalValue) < cons) {
    out.push({
      field: 'finalValue',
      message: `The final value ${finalValue} is below the estimate plus the margins (${cons}); raise it or lower a margin with its rationale.`,
    });
  }
  return out;
}
