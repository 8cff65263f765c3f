/** The fitted values a law's row is computed from. */
export type FittedLaw =
  | { law: 'gaussian'; logLik: number; pd: number; rho: number }
  | { law: 't'; logLik: number; pd: number; rho: number; nu: number }
  | { law: 'beta'; logLik: number; pd: number; equivalentRho: number }
  | { law: 'logitNormal'; logLik: number; mu: number; sigma: number };

