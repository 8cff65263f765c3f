'use client';

import { useId, useMemo, useState } from 'react';
import { pairInputProblem, pairMetrics, PAIR_LIMITS } from '@/lib/fits/pair';
import { fixed, pct } from '@/lib/fits/format';
import { PairDensity } from './pair-density';

const REFERENCE_RHOS = [0, 0.04, 0.12, 0.15, 0.24, 0.3, 0.5] as const;

function parsePercent(text: string): number {
  const t = text.trim().replace(',', '.').replace(/%$/, '');
  if (t === '') return Number.NaN;
  return Number(t) / 100;
}

/**
 * Two obligors' PDs and an asset correlation in; out the normal deviates, the joint default
 * probability under the Gaussian copula, the independent product, the default correlation and the
 * density picture. Everything is computed in the browser and follows the slider at once.
 * Used as the Pair explorer screen and as a panel of the fit review (seeded with the fitted PD and rho).
 */
export function PairExplorer({
  initialPdA = 0.05,
  initialPdB = 0.05,
  initialRho = 0.3,
  heading = 'Two obligors',
}: {
  initialPdA?: number;
  initialPdB?: number;
  initialRho?: number;
  heading?: string;
}) {
  const id = useId();
  const [pdA, setPdA] = useState(() => (initialPdA * 100).toPrecision(3).replace(/\.?0+$/, ''));
  const [pdB, setPdB] = useState(() => (initialPdB * 100).toPrecision(3).replace(/\.?0+$/, ''));
  const [rho, setRho] = useState(() => Math.min(PAIR_LIMITS.rhoMax, Math.max(0, initialRho)));
  const [rhoText, setRhoText] = useState(() => fixed(initialRho, 3));

  const p1 = parsePercent(pdA);
  const p2 = parsePercent(pdB);
  const problem = pairInputProblem(p1, p2, rho);
  const m = useMemo(() => (problem ? null : pairMetrics(p1, p2, rho)), [problem, p1, p2, rho]);
  const references = useMemo(
    () => (problem ? [] : REFERENCE_RHOS.map((r) => ({ r, m: pairMetrics(p1, p2, r) }))),
    [problem, p1, p2],
  );

  function onRhoText(text: string) {
    setRhoText(text);
    const v = Number(text.trim().replace(',', '.'));
    if (text.trim() !== '' && Number.isFinite(v) && v >= 0 && v <= PAIR_LIMITS.rhoMax) setRho(v);
  }

  const rhoTextProblem = (() => {
    const v = Number(rhoText.trim().replace(',', '.'));
    if (rhoText.trim() === '' || !Number.isFinite(v)) return 'Give the asset correlation as a number such as 0.12.';
    if (v < 0 || v > PAIR_LIMITS.rhoMax) return 'The asset correlation must lie between 0 and 0.999.';
    return null;
  })();

  return (
    <div className="grid gap-5 lg:grid-cols-[minmax(0,1fr)_minmax(0,360px)]" data-testid="pair-explorer">
      <div className="space-y-4">
        <h2>{heading}</h2>
        <div className="grid gap-3 sm:grid-cols-3">
          <div>
            <label className="label" htmlFor={`${id}-pa`}>
              PD of obligor A (%)
            </label>
            <input id={`${id}-pa`} className="field num" inputMode="decimal" value={pdA} onChange={(e) => setPdA(e.target.value)} />
          </div>
          <div>
            <label className="label" htmlFor={`${id}-pb`}>
              PD of obligor B (%)
            </label>
            <input id={`${id}-pb`} className="field num" inputMode="decimal" value={pdB} onChange={(e) => setPdB(e.target.value)} />
          </div>
          <div>
            <label className="label" htmlFor={`${id}-rt`}>
              Asset correlation ρ
            </label>
            <input
              id={`${id}-rt`}
              className="field num"
              inputMode="decimal"
              value={rhoText}
              onChange={(e) => onRhoText(e.target.value)}
              aria-invalid={rhoTextProblem ? true : undefined}
            />
          </div>
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
            value={Math.min(rho, 0.99)}
            onChange={(e) => {
              const v = Number(e.target.value);
              setRho(v);
              setRhoText(fixed(v, 3));
            }}
            className="w-full accent-[var(--color-accent)]"
            aria-valuetext={`correlation ${fixed(rho, 3)}`}
          />
        </div>
        {problem || rhoTextProblem ? (
          <p className="notice-bad text-sm" role="alert">
            {problem ?? rhoTextProblem}
          </p>
        ) : null}
        {m ? (
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
              At an asset correlation of {fixed(rho, 3)}, the two obligors default together with probability about{' '}
              <strong>{pct(m.joint, 3)}</strong>, {m.independent > 0 ? `${(m.joint / m.independent).toFixed(2)} times` : ''} the{' '}
              {pct(m.independent, 3)} they would have if they were independent.
            </p>
            <details>
              <summary className="cursor-pointer text-sm text-[var(--color-accent)]">The same pair at other correlations</summary>
              <table className="table mt-2">
                <thead>
                  <tr>
                    <th>ρ</th>
                    <th className="text-right">Joint default</th>
                    <th className="text-right">× independent</th>
                    <th className="text-right">Default correlation</th>
                    <th>Where the value comes from</th>
                  </tr>
                </thead>
                <tbody>
                  {references.map(({ r, m: mr }) => (
                    <tr key={r}>
                      <td className="num">{fixed(r, 2)}</td>
                      <td className="num text-right">{pct(mr.joint, 3)}</td>
                      <td className="num text-right">{(mr.joint / mr.independent).toFixed(2)}</td>
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
              <p className="mt-1 text-xs text-[var(--color-muted)]">
                Supervisory correlations are policy settings, not estimates (BCBS 2006, paras 272–273, 328–330).
              </p>
            </details>
          </>
        ) : null}
        <p className="text-xs text-[var(--color-muted)]">
          Gaussian one-factor model: one constant correlation and no tail dependence. The joint probability of
          extreme events can be higher in reality than this model says.
        </p>
      </div>
      <div>{m ? <PairDensity rho={rho} k1={m.k1} k2={m.k2} jointLabel={pct(m.joint, 3)} /> : null}</div>
    </div>
  );
}
