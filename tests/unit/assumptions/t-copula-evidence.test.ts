import { describe, expect, it } from 'vitest';
import { contentHash, diffVersions, type VersionContent } from '@/lib/assumptions/content';
import { versionCautions } from '@/lib/assumptions/consumer';
import { tCopulaCaution } from '@/lib/assumptions/t-copula-caution';
import { nuIntervalText, pickTCopula, tCopulaRefusal } from '@/lib/assumptions/t-copula-evidence';
import { AppError } from '@/lib/errors';
import { estimatorLabel } from '@/lib/stats/estimators/types';

// The engine's estimates.tCopula as a fit stores it (lib/stats/mixing-laws-block.ts): a finite nu
// whose profile interval is unbounded above, as the t-copula MLE gives on a 16-year panel.
const fitted = {
  rho: 0.0412,
  pd: 0.0118,
  nu: 6.725,
  logLik: -61.2,
  status: 'ok',
  intervals: { profile: { level: 0.95, lower: 0, upper: 0.6173 } },
  nuInterval: { level: 0.95, lower: 2.657, upper: null },
  nuProfileFlat: false,
  nuProfile: [],
};

function refusal(estimates: Record<string, unknown>, intervalMethod = 'profile') {
  try {
    pickTCopula({ segment: 'Small business', estimates }, intervalMethod);
  } catch (err) {
    expect(err).toBeInstanceOf(AppError);
    return { message: (err as AppError).message, field: (err as AppError).details?.field };
  }
  throw new Error('not refused');
}

describe('a Student-t copula estimate as the evidence of an assumption', () => {
  it('takes rho with its profile interval, the PD and nu with its interval, an unbounded end kept as null', () => {
    expect(pickTCopula({ segment: 'Small business', estimates: { tCopula: fitted } }, 'profile')).toEqual({
      estimate: 0.0412,
      pd: 0.0118,
      intervalLevel: 0.95,
      intervalLower: 0,
      intervalUpper: 0.6173,
      nu: 6.725,
      nuInterval: { level: 0.95, lower: 2.657, upper: null },
    });
    expect(nuIntervalText({ level: 0.95, lower: 2.657, upper: null })).toBe('[2.66, infinity (unbounded)] at 95%');
    expect(estimatorLabel('tCopula')).toBe('Student-t copula maximum likelihood');
  });

  it('refuses, with a sentence naming the field, a fit without the estimate, one whose status is not ok, the Gaussian limit, a missing part and another interval', () => {
    expect(refusal({})).toEqual({ message: expect.stringMatching(/^The fit has no Student-t copula estimate for Small business: run a fit that challenges/), field: 'estimator' });
    const clipped = { ...fitted, status: 'clipped', reason: 'The maximum lies at the smallest nu searched (2.04): the tail may be fatter still.' };
    expect(refusal({ tCopula: clipped })).toEqual({
      message: 'The Student-t copula estimate of Small business has status clipped, not ok, so it cannot be drafted: The maximum lies at the smallest nu searched (2.04): the tail may be fatter still.',
      field: 'estimator',
    });
    expect(refusal({ tCopula: { ...fitted, status: 'undefined', rho: null, pd: null, nu: null } }).message).toMatch(/status undefined, not ok/);
    expect(refusal({ tCopula: { ...fitted, nu: null, nuInterval: { level: 0.95, lower: 2.04, upper: null } } }).message).toMatch(/Gaussian limit \(nu = infinity\).*draft the Gaussian estimate instead/);
    expect(refusal({ tCopula: { ...fitted, nuInterval: null } }).message).toMatch(/lacks rho, the PD, nu or their profile intervals/);
    expect(refusal({ tCopula: { ...fitted, intervals: { profile: null } } }).message).toMatch(/lacks/);
    expect(refusal({ tCopula: fitted }, 'wald')).toEqual({ message: expect.stringMatching(/choose the interval profile, not wald/), field: 'intervalMethod' });
    expect(tCopulaRefusal('x', fitted)).toBeNull();
  });

  it('says what nu means for the tail: the tail dependence of the t copula, and that the Gaussian formula must not be used', () => {
    // 2 t_5(-sqrt(5 * 0.5 / 1.5)) = 0.25317, computed with SciPy 1.17 (scipy.stats.t.cdf); McNeil, Frey & Embrechts (2015) example 7.39 gives the formula
    const text = tCopulaCaution(0.5, 4);
    expect(text).toMatch(/nu = 4 degrees of freedom/);
    expect(text).toMatch(/lower tail dependence of two obligors is 0\.253 \(0 under the Gaussian copula\)/);
    expect(text).toMatch(/must use the t copula with this nu; put into the Gaussian \(Vasicek\) formula, the value understates the tail/);
    // and a version's own cautions carry it for a t value only
    expect(versionCautions({ defaultDefinitions: undefined, mixingLaw: 't', nu: 4, finalValue: 0.5 })).toEqual([text]);
    expect(versionCautions({ defaultDefinitions: undefined, mixingLaw: 'gaussian', nu: null, finalValue: 0.5 })).toEqual([]);
  });
});

describe('the mixing law in the content hash', () => {
  // A Gaussian version's content as drafted before the mixing law was kept.
  const before = {
    segment: 'Retail mortgages', fitRunId: 12, datasetId: 4, datasetSha256: 'a'.repeat(64), engineVersion: '3.1.0', seeds: { bootstrap: 7, audit: null },
    estimator: 'binomialMle', factorModel: 'independent', prior: null, estimate: 0.1234, intervalMethod: 'profile', intervalLevel: 0.95, intervalLower: 0.08, intervalUpper: 0.19,
    pd: 0.021, windowFrom: '2005', windowTo: '2024', defaultDefinitions: [{ definition: '90 days past due', from: '2005', to: '2024', periods: ['2005'] }],
    marginData: 0.01, marginDataRationale: 'Short history.', marginPractice: 0, marginPracticeRationale: 'No change.', marginGeneral: 0.02, marginGeneralRationale: 'Interval width.',
    conservativeValue: 0.1534, finalValue: 0.16, intendedUses: 'Economic capital.', limitations: 'Twenty years.', effectiveDate: '2026-01-01', reviewBy: '2027-01-01',
  };
  // The hash contentHash gave this content before the mixing law was kept (commit 11d11af), as stored in existing versions.
  const storedHash = 'd42d9442e0da228f426615107a8a79c6606de77aba5e233da577e63c5b926964';

  it('keeps the hash of an existing Gaussian version, and puts the law and nu in the hash of a t value', () => {
    const gaussian = { ...before, mixingLaw: 'gaussian', nu: null, nuInterval: null } as VersionContent;
    expect(contentHash(gaussian)).toBe(storedHash);
    const t = { ...gaussian, estimator: 'tCopula', mixingLaw: 't', nu: 6.7, nuInterval: { level: 0.95, lower: 2.7, upper: null } } as VersionContent;
    const tHash = contentHash(t);
    expect(tHash).not.toBe(contentHash({ ...gaussian, estimator: 'tCopula' }));
    expect(contentHash({ ...t, nu: 6.8 })).not.toBe(tHash);
    expect(contentHash({ ...t, nuInterval: { level: 0.95, lower: 2.7, upper: 40 } })).not.toBe(tHash);
    // the diff of two versions names the law
    expect(diffVersions(gaussian, t).map((c) => c.label)).toEqual(['Estimator', 'Mixing law', 'Degrees of freedom (nu)', 'Interval of nu']);
  });
});
