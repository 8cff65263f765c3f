'use client';

import { useId, useMemo, useState } from 'react';
import { FormField } from '@/components/forms/form-field';
import { fixed, pct, rho as rhoText4 } from '@/lib/format';
import { pairMetrics, PAIR_LIMITS, readPairInputs, readPlainNumber } from '@/lib/fits/pair';
import { pairTMetrics, readPairNu } from '@/lib/fits/pair-t';
import { PairDensity } from './pair-density';
import { nuText, PairTResults } from './pair-t-results';

const REFERENCE_RHOS = [0, 0.04, 0.12, 0.15, 0.24, 0.3, 0.5] as const;

/** A PD as the percentage typed into the field: 0.0125 -> "1.25". */
function percentText(p: number): string {
  return (p * 100).toPrecision(3).replace(/\.?0+$/, '');
}

/** A correlation as the text of its field: 0.3 -> "0.3", 0.12345 -> "0.1235". */
function rhoFieldText(r: number): string {
  return fixed(Math.min(PAIR_LIMITS.rhoMax, Math.max(0, r)), 4).replace(/0+$/, '').replace(/\.$/, '.0');
}

export type PairCopula = 'gaussian' | 't';

/** A fitted segment's t copula to start from (its PD for both obligors, its rho and nu). */
export type PairTStart = { pd: number; rho: number; nu: number; from: string };

/**
 * Two obligors' PDs and an asset correlation in; out the normal deviates, the joint default
 * probability under the Gaussian copula, the independent product, the default correlation and the
 * density picture. With the Student t copula chosen (nu degrees of freedom) the t figures, the tail
 * dependence and the t density are shown beside the Gaussian ones at the same inputs. Everything is
 * computed in the browser and follows the slider at once. While a field is invalid its error is
 * shown beside it (marked for screen readers) and no result is shown: the numbers on screen always
 * belong to the inputs on screen. Used as the Pair explorer screen and inside a segment's review
 * (started from the fitted PD and rho); `tStart` offers a fitted t copula as a start.
 */
export function PairExplorer({
  initialPdA = 0.05,
  initialPdB = 0.05,
  initialRho = 0.3,
  initialCopula = 'gaussian',
  initialNu = 4,
  tStart = null,
  heading = 'Two obligors',
}: {
  initialPdA?: number;
  initialPdB?: number;
  initialRho?: number;
  initialCopula?: PairCopula;
  initialNu?: number;
  tStart?: PairTStart | null;
  heading?: string;
}) {
  const id = useId();
  const [copula, setCopula] = useState<PairCopula>(initialCopula);
  const [text, setText] = useState(() => ({
    pdA: percentText(initialPdA),
    pdB: percentText(initialPdB),
    rho: rhoFieldText(initialRho),
  }));
  const [nuTyped, setNuTyped] = useState(() => nuText(initialNu));
  const isT = copula === 't';
  const read = useMemo(() => readPairInputs(text), [text]);
  const nuRead = useMemo(() => readPairNu(nuTyped), [nuTyped]);
  const problems: Partial<Record<'pdA' | 'pdB' | 'rho' | 'nu', string>> = isT && nuRead.problem !== null ? { ...read.problems, nu: nuRead.problem } : read.problems;
  const values = read.values && (!isT || nuRead.value !== null) ? read.values : null;
  const nu = isT ? nuRead.value : null;
  const m = useMemo(() => (values ? pairMetrics(values.p1, values.p2, values.rho) : null), [values]);
  // The t figures are integrals with a tolerance: should one ever miss it, say so instead of breaking the page.
  const tComputed = useMemo(() => {
    if (!values || nu === null) return null;
    try {
      return {
        m: pairTMetrics(values.p1, values.p2, values.rho, nu),
        references: REFERENCE_RHOS.map((r) => pairTMetrics(values.p1, values.p2, r, nu).joint),
        error: null,
      };
    } catch (err) {
      if (!(err instanceof RangeError)) throw err;
      return { m: null, references: null, error: err.message };
    }
  }, [values, nu]);
  const mt = tComputed?.m ?? null;
  const references = useMemo(
    () => (values ? REFERENCE_RHOS.map((r, i) => ({ r, m: pairMetrics(values.p1, values.p2, r), t: tComputed?.references?.[i] ?? null })) : []),
    [values, tComputed],
  );
  const rho = values?.rho ?? null;
  // The slider follows the correlation field whenever that field alone is usable.
  const sliderRho = read.problems.rho === undefined ? (readPlainNumber(text.rho, 'the asset correlation', '0.12').value ?? 0) : 0;
  const invalid = Object.keys(problems).length;
  const startFromFit = (s: PairTStart) => {
    setCopula('t');
    setText({ pdA: percentText(s.pd), pdB: percentText(s.pd), rho: rhoFieldText(s.rho) });
    setNuTyped(nuText(s.nu));
  };

  return (
    <div className={isT ? 'space-y-5' : 'grid gap-5 lg:grid-cols-[minmax(0,1fr)_minmax(0,360px)]'} data-testid="pair-explorer">
      <div className="min-w-0 space-y-4">
        <h2>{heading}</h2>
        <fieldset className="flex flex-wrap items-center gap-x-5 gap-y-2">
          <legend className="label">Copula of the two asset values</legend>
          <label className="flex items-center gap-2 text-sm">
            <input type="radio" name={`${id}-copula`} value="gaussian" checked={!isT} onChange={() => setCopula('gaussian')} />
            Gaussian
          </label>
          <label className="flex items-center gap-2 text-sm">
            <input type="radio" name={`${id}-copula`} value="t" checked={isT} onChange={() => setCopula('t')} />
            Student t, with the Gaussian beside it
          </label>
          {tStart ? (
            <button type="button" className="btn btn-quiet text-sm" onClick={() => startFromFit(tStart)} data-testid="pair-t-start">
              Start the t copula from {tStart.from} (ρ {fixed(tStart.rho, 3)}, ν {nuText(tStart.nu)}, PD {pct(tStart.pd, 3)})
            </button>
          ) : null}
        </fieldset>
        <div className={`grid gap-3 ${isT ? 'sm:grid-cols-4' : 'sm:grid-cols-3'}`}>
          <FormField id={`${id}-pa`} label="PD of obligor A (%)" error={problems.pdA}>
            {(a) => <input {...a} className="field num" inputMode="decimal" value={text.pdA} onChange={(e) => setText({ ...text, pdA: e.target.value })} />}
          </FormField>
          <FormField id={`${id}-pb`} label="PD of obligor B (%)" error={problems.pdB}>
            {(a) => <input {...a} className="field num" inputMode="decimal" value={text.pdB} onChange={(e) => setText({ ...text, pdB: e.target.value })} />}
          </FormField>
          <FormField id={`${id}-rt`} label="Asset correlation ρ" error={problems.rho}>
            {(a) => <input {...a} className="field num" inputMode="decimal" value={text.rho} onChange={(e) => setText({ ...text, rho: e.target.value })} />}
          </FormField>
          {isT ? (
            <FormField id={`${id}-nu`} label="Degrees of freedom ν (above 2)" error={problems.nu}>
              {(a) => <input {...a} className="field num" inputMode="decimal" value={nuTyped} onChange={(e) => setNuTyped(e.target.value)} />}
            </FormField>
          ) : null}
        </div>
        <div>
          <label className="label" htmlFor={`${id}-rs`}>
            Move the correlation
          </label>
          <input
            id={`${id}-rs`}
            type="range"
            min={0}
            max={0.99}
            step={0.005}
            value={Math.min(sliderRho, 0.99)}
            onChange={(e) => setText({ ...text, rho: String(Number(e.target.value)) })}
            className="w-full accent-[var(--color-accent)]"
            aria-valuetext={read.problems.rho === undefined ? `correlation ${fixed(sliderRho, 3)}` : 'correlation not set'}
          />
        </div>
        {invalid > 0 ? (
          <p className="notice-bad text-sm" role="alert" data-testid="pair-invalid">
            {invalid === 1 ? 'One field needs a change' : `${invalid} fields need a change`}: no result is shown until every field holds a usable number.
          </p>
        ) : null}
        {tComputed?.error ? (
          <p className="notice-bad text-sm" role="alert" data-testid="pair-t-error">
            The t copula’s figures could not be computed at these inputs ({tComputed.error}) Change an input, or choose the Gaussian copula.
          </p>
        ) : null}
        {mt ? <PairTResults m={mt} /> : null}
        {m && !isT ? (
          <>
            <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-2" data-testid="pair-results">
              <div className="flex justify-between border-b border-[#ecece6] py-1">
                <dt>Default threshold of A, Φ⁻¹(PD)</dt>
                <dd className="num">{fixed(m.k1, 3)}</dd>
              </div>
              <div className="flex justify-between border-b border-[#ecece6] py-1">
                <dt>Default threshold of B</dt>
                <dd className="num">{fixed(m.k2, 3)}</dd>
              </div>
              <div className="flex justify-between border-b border-[#ecece6] py-1">
                <dt>
                  <strong>Joint default probability</strong>
                </dt>
                <dd className="num font-semibold" data-testid="pair-joint">
                  {pct(m.joint, 4)}
                </dd>
              </div>
              <div className="flex justify-between border-b border-[#ecece6] py-1">
                <dt>If independent (PD A × PD B)</dt>
                <dd className="num" data-testid="pair-independent">
                  {pct(m.independent, 4)}
                </dd>
              </div>
              <div className="flex justify-between border-b border-[#ecece6] py-1">
                <dt>Default correlation</dt>
                <dd className="num" data-testid="pair-default-correlation">
                  {fixed(m.defaultCorrelation, 4)}
                </dd>
              </div>
              <div className="flex justify-between border-b border-[#ecece6] py-1">
                <dt>P(B defaults | A defaults)</dt>
                <dd className="num">{pct(m.secondGivenFirst, 3)}</dd>
              </div>
            </dl>
            <p className="text-sm" data-testid="pair-sentence">
              At an asset correlation of {rhoText4(rho)}, the two obligors default together with probability about{' '}
              <strong>{pct(m.joint, 3)}</strong>, {m.independent > 0 ? `${(m.joint / m.independent).toFixed(2)} times` : ''} the{' '}
              {pct(m.independent, 3)} they would have if they were independent.
            </p>
          </>
        ) : null}
        {m && (!isT || mt) ? (
          <>
            <details>
              <summary className="cursor-pointer text-sm text-[var(--color-accent)]">The same pair at other correlations</summary>
              <div className="scroll-box relative mt-2 overflow-x-auto" role="region" aria-label="The same pair at other correlations" tabIndex={0}>
              <table className="table">
                <thead>
                  <tr>
                    <th>ρ</th>
                    <th className="text-right">Joint default</th>
                    <th className="text-right">× independent</th>
                    {mt ? <th className="text-right">Joint default, t (ν = {nuText(mt.nu)})</th> : null}
                    <th className="text-right">Default correlation</th>
                    <th>Where the value comes from</th>
                  </tr>
                </thead>
                <tbody>
                  {references.map(({ r, m: mr, t: tj }) => (
                    <tr key={r}>
                      <td className="num">{fixed(r, 2)}</td>
                      <td className="num text-right">{pct(mr.joint, 3)}</td>
                      <td className="num text-right">{(mr.joint / mr.independent).toFixed(2)}</td>
                      {tj !== null ? <td className="num text-right">{pct(tj, 3)}</td> : null}
                      <td className="num text-right">{fixed(mr.defaultCorrelation, 4)}</td>
                      <td className="text-xs text-[var(--color-muted)]">
                        {r === 0.04
                          ? 'IRB qualifying revolving retail'
                          : r === 0.12
                            ? 'IRB corporate floor (high PD)'
                            : r === 0.15
                              ? 'IRB residential mortgage'
                              : r === 0.24
                                ? 'IRB corporate cap (low PD)'
                                : ''}
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
              </div>
              <p className="mt-1 text-xs text-[var(--color-muted)]">
                Supervisory correlations are policy settings, not estimates (BCBS 2006, paras 272–273, 328–330).
              </p>
            </details>
          </>
        ) : null}
        <p className="text-xs text-[var(--color-muted)]">
          {isT
            ? 'Both are one-correlation models of two asset values; the t copula adds a common mixing variable that makes extreme values occur together (tail dependence), the Gaussian has none. Which of them a history supports, and which ν, is weakly identified from a few yearly default rates: read these figures as what the choice costs, not as an estimate. They do not replace independent validation, the institution’s model-risk policy, supervisory requirements or qualified professional judgement.'
            : 'Gaussian one-factor model: one constant correlation and no tail dependence. The joint probability of extreme events can be higher in reality than this model says.'}
        </p>
      </div>
      {isT ? (
        mt && rho !== null ? (
          <div className="grid gap-5 md:grid-cols-2" data-testid="pair-densities">
            <div className="min-w-0">
              <h3 className="mb-1 text-sm font-semibold">Student t copula, ν = {nuText(mt.nu)}</h3>
              <PairDensity rho={rho} k1={mt.k1} k2={mt.k2} jointLabel={pct(mt.joint, 3)} nu={mt.nu} limit={6} />
            </div>
            <div className="min-w-0">
              <h3 className="mb-1 text-sm font-semibold">Gaussian copula</h3>
              <PairDensity rho={rho} k1={mt.gaussian.k1} k2={mt.gaussian.k2} jointLabel={pct(mt.gaussian.joint, 3)} limit={6} />
            </div>
          </div>
        ) : null
      ) : (
        <div>{m && rho !== null ? <PairDensity rho={rho} k1={m.k1} k2={m.k2} jointLabel={pct(m.joint, 3)} /> : null}</div>
      )}
    </div>
  );
}
