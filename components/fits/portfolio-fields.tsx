'use client';

import { useState } from 'react';

/** What the portfolio part of the New fit form holds. */
export interface PortfolioState {
  group: boolean;
  commonWindow: boolean;
  pairs: boolean;
  prior: 'none' | 'flat' | 'supervisory' | 'beta';
  strength: string;
  a: string;
  b: string;
  prudent: boolean;
  prudentRho: string;
  prudentConfidence: string;
}

export const INITIAL_PORTFOLIO: PortfolioState = {
  group: false,
  commonWindow: false,
  pairs: false,
  prior: 'none',
  strength: '20',
  a: '2',
  b: '10',
  prudent: false,
  prudentRho: '',
  prudentConfidence: '0.9',
};

/**
 * The request fields of the portfolio options (lib/fits/request.ts) from the form's state and the
 * chosen segments in their listed order, or a sentence naming what is wrong.
 */
export function portfolioRequest(state: PortfolioState, segments: readonly string[]): { body: Record<string, unknown> } | { error: string } {
  const body: Record<string, unknown> = {};
  if (state.group) {
    if (segments.length < 2) return { error: 'Grades under one factor: choose at least two segments.' };
    body.group = { segments: [...segments], commonWindow: state.commonWindow };
  }
  if (state.pairs) {
    if (segments.length < 2) return { error: 'Factor correlations: choose at least two segments.' };
    body.pairs = true;
  }
  if (state.prior === 'flat') body.prior = { kind: 'flat' };
  if (state.prior === 'supervisory') {
    const strength = Number(state.strength);
    if (!(strength > 0 && strength <= 10_000)) return { error: 'Prior strength: give a positive number (a + b of the Beta prior), for example 20.' };
    body.prior = { kind: 'supervisory', strength };
  }
  if (state.prior === 'beta') {
    const a = Number(state.a);
    const b = Number(state.b);
    if (!(a > 0 && b > 0)) return { error: 'Beta prior: give a > 0 and b > 0 (with a or b at 0 the prior has no mass inside (0, 1)).' };
    body.prior = { kind: 'beta', a, b };
  }
  if (state.prudent) {
    const confidence = Number(state.prudentConfidence);
    if (!(confidence > 0 && confidence < 1)) return { error: 'Most prudent PD: the confidence must be strictly between 0 and 1, for example 0.9.' };
    const rho = state.prudentRho.trim() === '' ? null : Number(state.prudentRho);
    if (rho !== null && !(rho >= 0 && rho < 1)) return { error: 'Most prudent PD: rho must be in [0, 1), or left empty for each segment\'s likelihood estimate.' };
    body.prudent = { rho, confidence };
  }
  return { body };
}

/** The portfolio options of a fit: grades under one factor, pairs, a prior, the most prudent PD. */
export function PortfolioFields({ id, state, onChange }: { id: string; state: PortfolioState; onChange: (next: PortfolioState) => void }) {
  const set = (patch: Partial<PortfolioState>) => onChange({ ...state, ...patch });
  const [open, setOpen] = useState(state.group || state.pairs || state.prior !== 'none' || state.prudent);
  return (
    <fieldset className="space-y-2">
      <legend className="label">Across the portfolio</legend>
      <button type="button" className="text-sm underline" aria-expanded={open} aria-controls={`${id}-portfolio`} onClick={() => setOpen(!open)}>
        {open ? 'Hide' : 'Show'} grades, factor correlations, low-default posterior and most prudent PD
      </button>
      {open ? (
        <div id={`${id}-portfolio`} className="space-y-2">
          <label className="flex items-center gap-2 text-sm">
            <input type="checkbox" checked={state.group} onChange={(e) => set({ group: e.target.checked })} /> Fit the chosen segments as rating grades under one factor (best grade first, in the order listed)
          </label>
          {state.group ? (
            <label className="ml-6 flex items-center gap-2 text-sm">
              <input type="checkbox" checked={state.commonWindow} onChange={(e) => set({ commonWindow: e.target.checked })} /> Use the years every grade has (otherwise grades with different years are refused)
            </label>
          ) : null}
          <label className="flex items-center gap-2 text-sm">
            <input type="checkbox" checked={state.pairs} onChange={(e) => set({ pairs: e.target.checked })} /> Correlations between the segments&apos; factors (every pair)
          </label>
          <div className="grid gap-2 sm:grid-cols-3">
            <div>
              <label className="label" htmlFor={`${id}-prior`}>
                Posterior of rho for low-default segments
              </label>
              <select id={`${id}-prior`} className="field" value={state.prior} onChange={(e) => set({ prior: e.target.value as PortfolioState['prior'] })}>
                <option value="none">none</option>
                <option value="flat">flat prior on rho</option>
                <option value="supervisory">Beta prior centred on the supervisory rho</option>
                <option value="beta">Beta(a, b) prior</option>
              </select>
            </div>
            {state.prior === 'supervisory' ? (
              <div>
                <label className="label" htmlFor={`${id}-strength`}>
                  Prior strength (a + b)
                </label>
                <input id={`${id}-strength`} className="field" inputMode="decimal" value={state.strength} onChange={(e) => set({ strength: e.target.value })} />
              </div>
            ) : null}
            {state.prior === 'beta' ? (
              <>
                <div>
                  <label className="label" htmlFor={`${id}-a`}>
                    a
                  </label>
                  <input id={`${id}-a`} className="field" inputMode="decimal" value={state.a} onChange={(e) => set({ a: e.target.value })} />
                </div>
                <div>
                  <label className="label" htmlFor={`${id}-b`}>
                    b
                  </label>
                  <input id={`${id}-b`} className="field" inputMode="decimal" value={state.b} onChange={(e) => set({ b: e.target.value })} />
                </div>
              </>
            ) : null}
          </div>
          <label className="flex items-center gap-2 text-sm">
            <input type="checkbox" checked={state.prudent} onChange={(e) => set({ prudent: e.target.checked })} /> Most prudent upper bound of the PD (Pluto &amp; Tasche)
          </label>
          {state.prudent ? (
            <div className="ml-6 grid gap-2 sm:grid-cols-2">
              <div>
                <label className="label" htmlFor={`${id}-prho`}>
                  At rho (empty: each segment&apos;s estimate)
                </label>
                <input id={`${id}-prho`} className="field" inputMode="decimal" value={state.prudentRho} onChange={(e) => set({ prudentRho: e.target.value })} />
              </div>
              <div>
                <label className="label" htmlFor={`${id}-pconf`}>
                  Confidence
                </label>
                <input id={`${id}-pconf`} className="field" inputMode="decimal" value={state.prudentConfidence} onChange={(e) => set({ prudentConfidence: e.target.value })} />
              </div>
            </div>
          ) : null}
          <p className="text-xs text-[var(--color-muted)]">
            The posterior depends on its prior, and the most prudent PD is an aid beside the PD an assumption uses: neither replaces independent validation or
            the institution&apos;s model-risk policy.
          </p>
        </div>
      ) : null}
    </fieldset>
  );
}
