'use client';

import { useMutation } from '@tanstack/react-query';
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useMemo, useState, type FormEvent } from 'react';
import { FormField, FormMessage } from '@/components/forms/form-field';
import { useFieldErrors } from '@/components/forms/use-field-errors';
import { intervalMethodLabel, intervalMethods } from '@/lib/assumptions/content';
import { apiSend } from '@/lib/client/api';
import { AppError } from '@/lib/errors';
import { pd, rho } from '@/lib/format';
import { problemOf, type FormFieldRef } from '@/lib/forms/place-errors';
import { priorText, valueSourceInSentence, valueSourceLabel, type PriorRecord } from '@/lib/assumptions/posterior-evidence';
import { nuIntervalText, nuText, type NuInterval } from '@/lib/assumptions/t-copula-evidence';
import type { EstimatorKey } from '@/lib/stats/estimators/types';
import { ESTIMATOR_MODEL, FIT_MODEL_LABELS } from '@/lib/stats/fit-models';
import { Cautions } from './cautions';

export type FitOption = {
  fitId: number;
  segment: string;
  label: string;
  estimates: Record<
    string,
    {
      rho: number | null;
      pd: number | null;
      intervals: Record<string, { level: number; lower: number; upper: number }>;
      /** The priors of a posterior median (recorded with the version). */
      prior?: PriorRecord;
      /** A t-copula value's nu with its interval, and what nu means for the tail. */
      nu?: { value: number; interval: NuInterval; caution: string };
      /** Why this estimate cannot be drafted, in a sentence. */
      refusal?: string;
      /** Not computed by this fit (the t copula of a fit that did not challenge the Gaussian copula). */
      missing?: boolean;
    }
  >;
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

/** The request path of each field and the id of its element, in the order of the form (the first with an error takes the focus). */
const FIELDS: readonly FormFieldRef[] = [
  ['fitId', 'fit-segment'],
  ['segment', 'fit-segment'],
  ['estimator', 'estimator'],
  ['intervalMethod', 'interval-method'],
  ...marginParts.flatMap(([k]) => [
    [`margins.${k}.value`, `margin-${k}`] as const,
    [`margins.${k}.rationale`, `rationale-${k}`] as const,
  ]),
  ['finalValue', 'final-value'],
  ['intendedUses', 'intended-uses'],
  ['limitations', 'limitations'],
  ['effectiveDate', 'effective-date'],
  ['reviewBy', 'review-by'],
];

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
  const methods = intervalMethods.filter((k) => est?.intervals?.[k]);
  const method = est?.intervals?.[intervalMethod] ? intervalMethod : (methods[0] ?? intervalMethod);
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
  const problem = useMemo(() => problemOf(m.error), [m.error]);
  const { error, formMessage } = useFieldErrors(problem, FIELDS);

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    m.mutate();
  };

  return (
    <form onSubmit={onSubmit} aria-label={props.mode === 'create' ? 'Draft an assumption' : 'Edit the draft'} className="space-y-5" noValidate>
      {props.mode === 'create' ? (
        <fieldset className="grid gap-3 md:grid-cols-3">
          <legend className="mb-2 font-semibold">Evidence (copied from the fit and frozen)</legend>
          <FormField id="fit-segment" label="Fit and segment" error={error('fit-segment')}>
            {(a) => (
              <select
                {...a}
                className="field"
                value={fitKey}
                onChange={(e) => {
                  setFitKey(e.target.value);
                  // An estimator the newly chosen segment cannot offer goes back to the first one.
                  const next = props.options.find((o) => `${o.fitId}|${o.segment}` === e.target.value)?.estimates[estimator];
                  if (!next || next.rho === null) setEstimator('binomialMle');
                }}
              >
                {props.options.map((o) => (
                  <option key={`${o.fitId}|${o.segment}`} value={`${o.fitId}|${o.segment}`}>
                    {o.label}
                  </option>
                ))}
              </select>
            )}
          </FormField>
          <FormField id="estimator" label="Estimator" error={error('estimator')}>
            {(a) => (
              <select {...a} className="field" value={estimator} onChange={(e) => setEstimator(e.target.value)}>
                {Object.entries(option?.estimates ?? {}).map(([k, e]) => {
                  // An assumption carries an interval: only estimators with a value and an interval can be drafted.
                  const usable = e.rho !== null && Object.keys(e.intervals).length > 0;
                  return (
                    <option key={k} value={k} disabled={!usable}>
                      {valueSourceLabel(k)}
                      {e.missing
                        ? ' (not in this fit: run a fit with the t-copula challenge)'
                        : e.refusal
                          ? ' (cannot be drafted: see below)'
                          : e.rho === null
                            ? ' (no value on this segment)'
                            : !usable
                              ? ' (no interval in this fit: cannot be drafted)'
                              : ''}
                    </option>
                  );
                })}
              </select>
            )}
          </FormField>
          <FormField id="interval-method" label="Interval" error={error('interval-method')}>
            {(a) => (
              <select {...a} className="field" value={method} onChange={(e) => setIntervalMethod(e.target.value)}>
                {intervalMethods.map((k) => (
                  <option key={k} value={k} disabled={!!est && !est.intervals[k]}>
                    {intervalMethodLabel(k)}
                    {est && !est.intervals[k] ? ' (not computed by this fit)' : ''}
                  </option>
                ))}
              </select>
            )}
          </FormField>
          {option?.estimates.tCopula?.refusal ? (
            <p className="text-sm text-[var(--color-muted)] md:col-span-3" data-testid="t-copula-refusal">
              {option.estimates.tCopula.refusal}
            </p>
          ) : null}
          {option && props.open?.[option.segment] ? (
            <p className="notice-caution text-sm md:col-span-3" role="note">
              Version {props.open[option.segment].version} of {option.segment} is still {props.open[option.segment].status.replace('_', ' ')}:
              finish or withdraw it before drafting another (<Link href={`/library/versions/${props.open[option.segment].id}`}>open it</Link>).
            </p>
          ) : null}
          <p className="text-sm md:col-span-3" data-testid="evidence-summary">
            Estimate <span className="num">{rho(estimate)}</span> by {valueSourceInSentence(estimator)}, PD <span className="num">{pd(est?.pd)}</span>,
            interval{' '}
            {interval ? (
              <span className="num">
                [{rho(interval.lower)}, {rho(interval.upper)}] at {Math.round(interval.level * 1000) / 10}%
              </span>
            ) : (
              <span className="text-[var(--color-bad)]">not computed by this fit for this estimator</span>
            )}
            {model ? <>; model: {FIT_MODEL_LABELS[model]}</> : null}
            {est?.nu ? (
              <span data-testid="evidence-nu">
                ; mixing law: Student-t copula with nu <span className="num">{nuText(est.nu.value)}</span>, interval of nu{' '}
                <span className="num">{nuIntervalText(est.nu.interval)}</span>, recorded with the version. {est.nu.caution}
              </span>
            ) : (
              <>; mixing law: Gaussian copula</>
            )}
            {est?.prior ? (
              <span data-testid="evidence-prior">
                ; prior {priorText(est.prior)}, recorded with the version. A posterior depends on its prior as well as on the data: say in the
                rationale why this prior.
              </span>
            ) : null}
          </p>
          <div className="md:col-span-3">
            <Cautions compact title="The value you draft carries these cautions wherever it is used." />
          </div>
        </fieldset>
      ) : (
        <p className="text-sm">
          Estimate <span className="num">{rho(props.estimate)}</span> (the evidence is frozen; draft a new version to use another fit).
        </p>
      )}

      <fieldset className="space-y-3">
        <legend className="mb-1 font-semibold">Margins of conservatism (added to the estimate, on the correlation scale)</legend>
        {marginParts.map(([k, label]) => (
          <div key={k} className="grid gap-2 md:grid-cols-[12rem_1fr]">
            <FormField id={`margin-${k}`} label={`Margin: ${label}`} error={error(`margin-${k}`)}>
              {(a) => (
                <input
                  {...a}
                  className="field num"
                  type="number"
                  step="any"
                  min="0"
                  value={margins[k].value}
                  onChange={(e) => setMargins({ ...margins, [k]: { ...margins[k], value: e.target.value } })}
                />
              )}
            </FormField>
            <FormField id={`rationale-${k}`} label={`Rationale: ${label}`} error={error(`rationale-${k}`)}>
              {(a) => (
                <textarea
                  {...a}
                  className="field"
                  rows={2}
                  value={margins[k].rationale}
                  onChange={(e) => setMargins({ ...margins, [k]: { ...margins[k], rationale: e.target.value } })}
                />
              )}
            </FormField>
          </div>
        ))}
        <div className="grid gap-3 md:grid-cols-3">
          <div>
            <span className="label">Estimate plus margins</span>
            <p className="num py-1.5" data-testid="conservative-value">{conservative ?? '—'}</p>
          </div>
          <FormField id="final-value" label="Final value (empty: estimate plus margins)" error={error('final-value')}>
            {(a) => (
              <input
                {...a}
                className="field num"
                type="number"
                step="any"
                min="0"
                max="0.999"
                value={finalValue}
                placeholder={conservative !== null ? String(conservative) : ''}
                onChange={(e) => setFinalValue(e.target.value)}
              />
            )}
          </FormField>
        </div>
      </fieldset>

      <div className="grid gap-3 md:grid-cols-2">
        <FormField id="intended-uses" label="Intended uses" error={error('intended-uses')}>
          {(a) => <textarea {...a} className="field" rows={3} value={intendedUses} onChange={(e) => setIntendedUses(e.target.value)} />}
        </FormField>
        <FormField id="limitations" label="Limitations" error={error('limitations')}>
          {(a) => <textarea {...a} className="field" rows={3} value={limitations} onChange={(e) => setLimitations(e.target.value)} />}
        </FormField>
        <FormField id="effective-date" label="Effective date" error={error('effective-date')}>
          {(a) => <input {...a} className="field" type="date" value={effectiveDate} onChange={(e) => setEffectiveDate(e.target.value)} />}
        </FormField>
        <FormField id="review-by" label="Review by (empty: 12 months after the effective date, the maximum)" error={error('review-by')}>
          {(a) => <input {...a} className="field" type="date" value={reviewBy} onChange={(e) => setReviewBy(e.target.value)} />}
        </FormField>
      </div>

      <FormMessage message={formMessage} />
      <div className="flex gap-2">
        <button type="submit" className="btn" disabled={m.isPending}>
          {props.mode === 'create' ? 'Save draft' : 'Save changes'}
        </button>
      </div>
    </form>
  );
}
