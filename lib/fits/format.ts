/**
 * Number formatting for the fit screens: probabilities as percentages with enough digits to be read
 * at small values, correlations with three decimals. Pure; used by server and client components.
 */

/** 0.0071346 -> "0.713%"; 0.00001234 -> "0.00123%". Keeps three significant digits below 1%. */
export function pct(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  const v = x * 100;
  if (v === 0) return '0%';
  const abs = Math.abs(v);
  if (abs >= 1) return `${v.toFixed(Math.max(0, digits - 1))}%`;
  const decimals = Math.min(8, digits - 1 - Math.floor(Math.log10(abs)));
  return `${v.toFixed(decimals)}%`;
}

/** A correlation or other number in [0, 1] with a fixed number of decimals. */
export function fixed(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  return x.toFixed(digits);
}

/** "[0.012, 0.115]" or "—" */
export function interval(lower: number | null | undefined, upper: number | null | undefined, digits = 3): string {
  if (lower === null || lower === undefined || upper === null || upper === undefined) return '—';
  return `[${fixed(lower, digits)}, ${fixed(upper, digits)}]`;
}
