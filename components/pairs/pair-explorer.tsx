'use client';

import { useId, useMemo, useState } from 'react';
import { FormField } from '@/components/forms/form-field';
import { fixed, pct, rho as rhoText4 } from '@/lib/format';
import { pairMetrics, PAIR_LIMITS, readPairInputs } from '@/lib/fits/pair';
import { PairDensity } from './pair-density';

const REFERENCE_RHOS = [0, 0.04, 0.12, 0.15, 0.24, 0.3, 0.5] as const;

/** A PD as the percentage typed into the field: 0.0125 -> "1.25". */
function percentText(p: number): string {
  return (p * 100).toPrecision(3).replace(/\.?0+$/, '');
}

/**
 * Two obligors' PDs and an asset correlation in; out the normal deviates, the joint default
 * probability under the Gaussian copula, the independent product, the default correlation and the
 * density picture. Everything is computed in the browser and follows the slider at once. While a
 * field is invalid its error is shown beside it (marked for screen readers) and no result is shown:
 * the numbers on screen always belong to the inputs on screen. Used as the Pair explorer screen and
 * inside a segment's review (started from the fitted PD and rho).
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
  const [text, setText] = useState(() => ({
    pdA: percentText(initialPdA),
    pdB: percentText(initialPdB),
    rho: fixed(Math.min(PAIR_LIMITS.rhoMax, Math.max(0, initialRho)), 4).replace(/0+$/, '').replace(/\.$/, '.0'),
  }));
  const { problems, values } = useMemo(() => readPairInputs(text), [text]);
  const m = useMemo(() => (values ? pairMetrics(values.p1, values.p2, values.rho) : null), [values]);
  const references = useMemo(() => (values ? REFERENCE_RHOS.map((r) => ({ r, m: pairMetrics(values.p1, values.p2, r) })) : []), [values]);
  const rho = values?.rho ?? null;
  const invalid = Object.keys(problems).length;

  return (
    <div className="grid gap-5 lg:grid-cols-[minmax(0,1fr)_minmax(0,360px)]" data-testid="pair-explorer">
      <div className="min-w-0 space-y-4">
        <h2>{heading}</h2>
        <div className="grid gap-3 sm:grid-cols-3">
          <FormField id={`${id}-pa`} label="PD of obligor A (%)" error={problems.pdA}>
            {(a) => <input {...a} className="field num" inputMode="decimal" value={text.pdA} onChange={(e) => setText({ ...text, pdA: e.target.value })} />}
          </FormField>
          <FormField id={`${id}-pb`} label="PD of obligor B (%)" error={problems.pdB}>
            {(a) => <input {...a} className="field num" inputMode="decimal" value={text.pdB} onChange={(e) => setText({ ...text, pdB: e.target.value })} />}
          </FormField>
          <FormField id={`${id}-rt`} label="Asset correlation ρ" error={problems.rho}>
            {(a) => <input {...a} className="field num" inputMode="decimal" value={text.rho} onChange={(e) => setText({ ...text, rho: e.target.value })} />}
          </FormField>
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
            value={Math.min(rho ?? 0, 0.99)}
            onChange={(e) => setText({ ...text, rho: String(Number(e.target.value)) })}
            className="w-full accent-[var(--color-accent)]"
            aria-valuetext={rho === null ? 'correlation not set' : `correlation ${fixed(rho, 3)}`}
          />
        </div>
        {invalid > 0 ? (
          <p className="notice-bad text-sm" role="alert" data-testid="pair-invalid">
            {invalid === 1 ? 'One field needs a change' : `${invalid} fields need a change`}: no result is shown until every field holds a usable number.
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
              At an asset correlation of {rhoText4(rho)}, the two obligors default together with probability about{' '}
              <strong>{pct(m.joint, 3)}</strong>, {m.independent > 0 ? `${(m.joint / m.independent).toFixed(2)} times` : ''} the{' '}
              {pct(m.independent, 3)} they would have if they were independent.
            </p>
            <details>
              <summary className="cursor-pointer text-sm text-[var(--color-accent)]">The same pair at other correlations</summary>
              <div className="scroll-box relative mt-2 overflow-x-auto" role="region" aria-label="The same pair at other correlations" tabIndex={0}>
              <table className="table">
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
              </div>
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
      <div>{m && rho !== null ? <PairDensity rho={rho} k1={m.k1} k2={m.k2} jointLabel={pct(m.joint, 3)} /> : null}</div>
    </div>
  );
}
