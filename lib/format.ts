/**
 * The one way numbers are written on every screen (and in the e-mails and the CLI's text where they
 * show a correlation or a PD): a PD or any other probability as a percentage, a correlation with
 * RHO_DECIMALS decimals wherever it appears, counts with thousands separators and the right plural.
 * Pure; used by server and client components alike. Stored values and the API keep full precision:
 * these functions only write them for reading.
 */

/** Decimals of an asset correlation on every screen (library, version page, fit review, compare). */
export const RHO_DECIMALS = 4;

const DASH = '—';

function missing(x: number | null | undefined): x is null | undefined {
  return x === null || x === undefined || !Number.isFinite(x);
}

/**
 * A probability as a percentage with `digits` significant digits below 1% and `digits - 1`
 * decimals above: 0.0071346 -> "0.713%", 0.00001234 -> "0.00123%", 0.0525 -> "5.25%".
 */
export function pct(x: number | null | undefined, digits = 3): string {
  if (missing(x)) return DASH;
  const v = x * 100;
  if (v === 0) return '0%';
  const abs = Math.abs(v);
  if (abs >= 1) return `${v.toFixed(Math.max(0, digits - 1))}%`;
  const decimals = Math.min(8, digits - 1 - Math.floor(Math.log10(abs)));
  return `${v.toFixed(decimals)}%`;
}

/** A probability of default, always as a percentage ("1.25%", "0.0713%"). */
export function pd(x: number | null | undefined): string {
  return pct(x, 3);
}

/** An asset correlation with RHO_DECIMALS decimals: 0.12 -> "0.1200". */
export function rho(x: number | null | undefined): string {
  return fixed(x, RHO_DECIMALS);
}

/** Any other number with a fixed number of decimals, or a dash when there is none. */
export function fixed(x: number | null | undefined, digits = 3): string {
  if (missing(x)) return DASH;
  return x.toFixed(digits);
}

/** An interval of correlations: "[0.0120, 0.1150]", or a dash when either end is missing. */
export function interval(lower: number | null | undefined, upper: number | null | undefined): string {
  if (missing(lower) || missing(upper)) return DASH;
  return `[${rho(lower)}, ${rho(upper)}]`;
}

/** A signed difference with a true minus sign: "+0.0123", "−0.0040". */
export function signed(x: number | null | undefined, digits = RHO_DECIMALS): string {
  if (missing(x)) return DASH;
  return `${x >= 0 ? '+' : '−'}${Math.abs(x).toFixed(digits)}`;
}

/** A p-value: four decimals, or in exponent form when small, or "below 10⁻¹²". */
export function pValue(p: number): string {
  if (p < 1e-12) return 'below 10⁻¹²';
  if (p < 1e-4) return p.toExponential(1);
  return p.toFixed(4);
}

/** A confidence level or other share written as a round percentage: 0.95 -> "95%", 0.999 -> "99.9%". */
export function level(x: number): string {
  return `${Math.round(x * 1000) / 10}%`;
}

/** A whole number with thousands separators: 1234567 -> "1,234,567". */
export function integer(n: number): string {
  return Math.round(n).toLocaleString('en-GB');
}

/** The noun for `n` things: plural(1, 'row') -> "row", plural(2, 'row') -> "rows", plural(2, 'was', 'were'). */
export function plural(n: number, singular: string, pluralForm = `${singular}s`): string {
  return n === 1 ? singular : pluralForm;
}

/** A count with its noun: count(1, 'cohort row') -> "1 cohort row", count(18000, 'loan') -> "18,000 loans". */
export function count(n: number, singular: string, pluralForm?: string): string {
  return `${integer(n)} ${plural(n, singular, pluralForm)}`;
}

/** A stored ISO instant as "YYYY-MM-DD HH:MM UTC", or a dash. */
export function when(iso: string | null | undefined): string {
  return iso ? `${iso.replace('T', ' ').slice(0, 16)} UTC` : DASH;
}

const SEED_NAMES: Record<string, string> = { bootstrap: 'bootstrap', audit: 'simulation study', breakTest: 'break test', mixingLaws: 'copula test' };

/**
 * A fit's seeds ({ bootstrap, audit, breakTest, mixingLaws }) in words, "bootstrap 7; simulation
 * study not run", as the version pages and reports write them; anything else as JSON.
 */
export function seedsText(seeds: unknown): string {
  if (seeds && typeof seeds === 'object' && !Array.isArray(seeds)) {
    const parts = Object.entries(seeds as Record<string, unknown>).map(([k, v]) => `${SEED_NAMES[k] ?? k} ${v === null || v === undefined ? 'not run' : String(v)}`);
    return parts.length ? parts.join('; ') : 'none';
  }
  return seeds === null || seeds === undefined ? '—' : JSON.stringify(seeds);
}
