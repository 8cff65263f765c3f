/**
 * Short names of the fit warnings for tables where the full sentence does not fit (the overview of
 * a fit's segments); the sentence itself (`message`) is what the review and the compare page show.
 * A code without a short name here is shown with its dashes as spaces.
 */
const WARNING_LABELS: Readonly<Record<string, string>> = {
  'not-identified-no-defaults': 'no defaults at all',
  'not-identified-all-defaults': 'every obligor defaulted',
  'not-identified-short': 'too few periods',
  'not-identified-flat': 'flat likelihood',
  'short-series': 'short series',
  'zero-default-periods': 'years without defaults',
  'all-default-periods': 'years where all defaulted',
  'at-boundary': 'ρ at 0',
  'at-search-limit': 'ρ at the search limit',
  'mle-not-converged': 'likelihood did not converge',
  autocorrelation: 'autocorrelated factor',
  'pit-autocorrelation': 'serially dependent years',
  'persistent-factor': 'persistent factor',
  'structural-break': 'break in the window',
  'integration-tolerance': 'integrals above tolerance',
  'bootstrap-failures': 'bootstrap replications failed',
  'bootstrap-unavailable': 'no bootstrap',
  'audit-unavailable': 'no simulation study',
  'sme-turnover-missing': 'SME turnover missing',
};

export function warningLabel(code: string): string {
  return WARNING_LABELS[code] ?? code.replace(/-/g, ' ');
}
