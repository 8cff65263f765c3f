import { rho as rhoText } from '@/lib/format';
import { tCopulaTailDependence } from '@/lib/stats/t-copula-tail';
import { nuText } from './t-copula-evidence';

// Apart from t-copula-evidence.ts, which the draft form (a client island) reaches through
// content.ts: the tail-dependence routine stays on the server.

/**
 * What nu means for the joint tail, for the value's page, report and draft form: the lower
 * tail-dependence coefficient of two obligors' latent variables at (rho, nu) (McNeil, Frey &
 * Embrechts 2015, example 7.39; 0 under the Gaussian copula) and the instruction that a downstream
 * model must use the t copula with this nu, not the Gaussian (Vasicek) formula.
 */
export function tCopulaCaution(rho: number, nu: number): string {
  const lambda = tCopulaTailDependence(rho, nu);
  return (
    `This value is the correlation of a Student-t copula with nu = ${nuText(nu)} degrees of freedom. The smaller nu, the fatter the joint tail: ` +
    `at rho ${rhoText(rho)} the lower tail dependence of two obligors is ${lambda.toFixed(3)} (0 under the Gaussian copula), so many obligors default ` +
    'together in a severe year more often than the Gaussian copula with the same rho says. A downstream model must use the t copula with this nu; ' +
    'put into the Gaussian (Vasicek) formula, the value understates the tail.'
  );
}
