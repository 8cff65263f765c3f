'use client';

import { useMutation } from '@tanstack/react-query';
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useState, type FormEvent } from 'react';
import { AppError } from '@/lib/errors';
import { apiSend } from '@/lib/client/api';
import { estimatorLabel, type EstimatorKey } from '@/lib/stats/estimators/types';
import { ESTIMATOR_MODEL, FIT_MODEL_LABELS } from '@/lib/stats/fit-models';

/** The interval methods of the engine's results, in the order offered, with their names. */
const INTERVAL_LABELS: readonly (readonly [string, string])[] = [
  ['profile', 'profile likelihood'],
  ['wald', 'Wald (logit scale)'],
  ['bootstrap', 'parametric bootstrap'],
  ['chiSquare', 'chi-square (closed form, large-pool approximation)'],
];

export type FitOption = {
  fitId: number;
  segment: string;
  label: string;
  estimates: Record<string, { rho: number | null; pd: number | null; intervals: Record<string, { level: number; lower: number; upper: number }> }>;
};

export type DraftValues = {
  margins: { data: { value: number; rationale: string }; practice: { value: number; rationale: string }; general: { value: number; rationale: string } };
  finalValue: number | null;
  intendedUses: string;
  limitations: string;
  effectiveDate: string;
  reviewBy: string;
};

const marginParts = [
  ['data', 'Data and method deficiencies'],
  ['practice', 'Changes in lending or recovery practice'],
  ['general', 'General estimation error'],
] as const;

/** Six decimals for reading (the stored evidence keeps full precision). */
function six(x: number | null | undefined): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '—' : String(Number(x.toFixed(6)));
}

function round(x: number) {
  return Math.round(x * 1e10) / 1e10;
}

/**
 * The draft and edit form of an assumption version: the fit evidence (on a new draft), the three
 * margins of conservatism each with a rationale, the final value, intended uses and limitations,
 * and the dates. The server validates everything again and names the field it refuses.
 */
export function DraftForm(
  props:
    | {
        mode: 'create';
        options: FitOption[];
        initialFit?: string;
        today: string;
        /** Versions still on their way to publication, by segment: a segment has at most one. */
        open?: Record<string, { id: number; version: number; status: string }>;
      }
    | { mode: 'edit'; versionId: number; estimate: number; initial: DraftValues; today: string },
) {
  const router = useRouter();
  const [fitKey, setFitKey] = useState(props.mode === 'create' ? (props.initialFit ?? (props.options[0] ? `${props.options[0].fitId}|${props.options[0].segment}` : '')) : '');
  const [estimator, setEstimator] = useState('binomialMle');
  const [intervalMethod, setIntervalMethod] = useState('profile');
  const init = props.mode === 'edit' ? props.initial : null;
  const [margins, setMargins] = useState({
    data: { value: String(init?.margins.data.value ?? 0), rationale: init?.margins.data.rationale ?? '' },
    practice: { value: String(init?.margins.practice.value ?? 0), rationale: init?.margins.practice.rationale ?? '' },
    general: { value: String(init?.margins.general.value ?? 0), rationale: init?.margins.general.rationale ?? '' },
  });
  const [finalValue, setFinalValue] = useState(init?.finalValue != null ? String(init.finalValue) : '');
  const [intendedUses, setIntendedUses] = useState(init?.intendedUses ?? '');
  const [limitations, setLimitations] = useState(init?.limitations ?? '');
  const [effectiveDate, setEffectiveDate] = useState(init?.effectiveDate ?? props.today);
  const [reviewBy, setReviewBy] = useState(init?.reviewBy ?? '');

  const option = props.mode === 'create' ? props.options.find((o) => `${o.fitId}|${o.segment}` === fitKey) : undefined;
  const est = option?.estimates[estimator];
  const estimate = props.mode === 'edit' ? props.estimate : (est?.rho ?? null);
  // The interval asked for when this estimator has it, else the first it has: each estimator has its own (profile, chi-square, bootstrap)
  const methods = INTERVAL_LABELS.filter(([k]) => est?.intervals?.[k]);
  const method = est?.intervals?.[intervalMethod] ? intervalMethod : (methods[0]?.[0] ?? intervalMethod);
  const interval = est?.intervals?.[method];
  const model = ESTIMATOR_MODEL[estimator as EstimatorKey];
  const sum = estimate === null ? null : estimate + Number(margins.data.value || 0) + Number(margins.practice.value || 0) + Number(margins.general.value || 0);
  const conservative = sum !== null && Number.isFinite(sum) ? round(sum) : null;

  const m = useMutation({
    mutationFn: async () => {
      const body = {
        margins: {
          data: { value: Number(margins.data.value), rationale: margins.data.rationale },
          practice: { value: Number(margins.practice.value), rationale: margins.practice.rationale },
          general: { value: Number(margins.general.value), rationale: margins.general.rationale },
        },
        ...(finalValue.trim() ? { finalValue: Number(finalValue) } : {}),
        intendedUses,
        limitations,
        effectiveDate,
        ...(reviewBy ? { reviewBy } : {}),
      };
      if (props.mode === 'edit') {
        await apiSend('PATCH', `/api/assumptions/${props.versionId}`, body);
        return props.versionId;
      }
      if (!option) throw new AppError('invalid:fit', 'Choose a fit and segment to draft from.');
      const r = await apiSend<{ id: number }>('POST', '/api/assumptions', { ...body, fitId: option.fitId, segment: option.segment, estimator, intervalMethod: method });
      return r.id;
    },
    onSuccess: (id) => {
      router.push(`/library/versions/${id}`);
      router.refresh();
    },
  });
  const err = m.error instanceof AppError ? m.error : m.error ? new AppError('internal:client', m.error.message) : null;
  const errField = (err?.details?.field as string | undefined) ?? null;

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    m.mutate();
  };

  return (
    <form onSubmit={onSubmit} aria-label={props.mode === 'create' ? 'Draft an assumption' : 'Edit the draft'} className="space-y-5">
      {props.mode === 'create' ? (
        <fieldset className="grid gap-3 md:grid-cols-3">
          <legend className="mb-2 font-semibold">Evidence (copied from the fit and frozen)</legend>
          <div>
            <label className="label" htmlFor="fit-segment">Fit and segment</label>
            <select id="fit-segment" className="field" value={fitKey} onChange={(e) => setFitKey(e.target.value)}>
              {props.options.map((o) => (
                <option key={`${o.fitId}|${o.segment}`} value={`${o.fitId}|${o.segment}`}>
                  {o.label}
                </option>
              ))}
            </select>
          </div>
          <div>
            <label className="label" htmlFor="estimator">Estimator</label>
            <select id="estimator" className="field" value={estimator} onChange={(e) => setEstimator(e.target.value)}>
              {Object.entries(option?.estimates ?? {}).map(([k, e]) => {
                // An assumption carries an interval: only estimators with a value and an interval can be drafted.
                const usable = e.rho !== null && Object.keys(e.intervals).length > 0;
                return (
                  <option key={k} value={k} disabled={!usable}>
                    {estimatorLabel(k)}
                    {e.rho === null ? ' (no value on this segment)' : !usable ? ' (no interval: cannot be drafted)' : ''}
                  </option>
                );
              })}
            </select>
          </div>
          <div>
            <label className="label" htmlFor="interval-method">Interval</label>
            <select id="interval-method" className="field" value={method} onChange={(e) => setIntervalMethod(e.target.value)}>
              {methods.length > 0 ? (
                methods.map(([k, label]) => (
                  <option key={k} value={k}>
                    {label}
                  </option>
                ))
              ) : (
                <option value={method}>none computed by this fit</option>
              )}
            </select>
          </div>
          {option && props.open?.[option.segment] ? (
            <p className="notice-caution text-sm md:col-span-3" role="note">
              Version {props.open[option.segment].version} of {option.segment} is still {props.open[option.segment].status.replace('_', ' ')}:
              finish or withdraw it before drafting another (<Link href={`/library/versions/${props.open[option.segment].id}`}>open it</Link>).
            </p>
          ) : null}
          <p className="text-sm md:col-span-3" data-testid="evidence-summary">
            Estimate <span className="num">{six(estimate)}</span>, PD <span className="num">{six(est?.pd)}</span>, interval{' '}
            {interval ? (
              <span className="num">
                [{six(interval.lower)}, {six(interval.upper)}] at {six(interval.level * 100)}%
              </span>
            ) : (
              <span className="text-[var(--color-bad)]">not computed by this fit for this estimator</span>
            )}
            {model ? <>; model: {FIT_MODEL_LABELS[model]}</> : null}
          </p>
        </fieldset>
      ) : (
        <p className="text-sm">
          Estimate <span className="num">{six(props.estimate)}</span> (the evidence is frozen; draft a new version to use another fit).
        </p>
      )}

      <fieldset className="space-y-3">
        <legend className="mb-1 font-semibold">Margins of conservatism (added to the estimate, on the correlation scale)</legend>
        {marginParts.map(([k, label]) => (
          <div key={k} className="grid gap-2 md:grid-cols-[12rem_1fr]">
            <div>
              <label className="label" htmlFor={`margin-${k}`}>{`Margin: ${label}`}</label>
              <input
                id={`margin-${k}`}
                className="field num"
                type="number"
                step="any"
                min="0"
                value={margins[k].value}
                aria-invalid={errField === `margins.${k}.value` || undefined}
                onChange={(e) => setMargins({ ...margins, [k]: { ...margins[k], value: e.target.value } })}
              />
            </div>
            <div>
              <label className="label" htmlFor={`rationale-${k}`}>{`Rationale: ${label}`}</label>
              <textarea
                id={`rationale-${k}`}
                className="field"
                rows={2}
                value={margins[k].rationale}
                aria-invalid={errField === `margins.${k}.rationale` || undefined}
                onChange={(e) => setMargins({ ...margins, [k]: { ...margins[k], rationale: e.target.value } })}
              />
            </div>
          </div>
        ))}
        <div className="grid gap-3 md:grid-cols-3">
          <div>
            <span className="label">Estimate plus margins</span>
            <p className="num py-1.5" data-testid="conservative-value">{conservative ?? '—'}</p>
          </div>
          <div>
            <label className="label" htmlFor="final-value">Final value (empty: estimate plus margins)</label>
            <input id="final-value" className="field num" type="number" step="any" min="0" max="0.999" value={finalValue} placeholder={conservative !== null ? String(conservative) : ''} onChange={(e) => setFinalValue(e.target.value)} aria-invalid={errField === 'finalValue' || undefined} />
          </div>
        </div>
      </fieldset>

      <div className="grid gap-3 md:grid-cols-2">
        <div>
          <label className="label" htmlFor="intended-uses">Intended uses</label>
          <textarea id="intended-uses" className="field" rows={3} value={intendedUses} onChange={(e) => setIntendedUses(e.target.value)} aria-invalid={errField === 'intendedUses' || undefined} />
        </div>
        <div>
          <label className="label" htmlFor="limitations">Limitations</label>
          <textarea id="limitations" className="field" rows={3} value={limitations} onChange={(e) => setLimitations(e.target.value)} aria-invalid={errField === 'limitations' || undefined} />
        </div>
        <div>
          <label className="label" htmlFor="effective-date">Effective date</label>
          <input id="effective-date" className="field" type="date" value={effectiveDate} onChange={(e) => setEffectiveDate(e.target.value)} />
        </div>
        <div>
          <label className="label" htmlFor="review-by">Review by (empty: 12 months after the effective date, the maximum)</label>
          <input id="review-by" className="field" type="date" value={reviewBy} onChange={(e) => setReviewBy(e.target.value)} aria-invalid={errField === 'reviewBy' || undefined} />
        </div>
      </div>

      {err ? (
        <p className="notice-bad text-sm" role="alert">
          {err.message}
          {errField ? <span className="ml-1 text-xs">(field: {errField})</span> : null}
        </p>
      ) : null}
      <div className="flex gap-2">
        <button type="submit" className="btn" disabled={m.isPending}>
          {props.mode === 'create' ? 'Save draft' : 'Save changes'}
        </button>
      </div>
    </form>
  );
}
