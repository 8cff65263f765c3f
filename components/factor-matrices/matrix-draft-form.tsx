'use client';

import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useMemo, useState, type FormEvent } from 'react';
import { FormField, FormMessage } from '@/components/forms/form-field';
import { useFieldErrors } from '@/components/forms/use-field-errors';
import { apiSend } from '@/lib/client/api';
import { MARGIN_DIRECTION } from '@/lib/factor-matrices/cautions';
import { problemOf, type FormFieldRef } from '@/lib/forms/place-errors';

const FIELDS: readonly FormFieldRef[] = [
  ['fitId', 'matrix-margin'],
  ['margin.value', 'matrix-margin'],
  ['margin.rationale', 'matrix-margin-rationale'],
  ['intendedUses', 'matrix-intended-uses'],
  ['limitations', 'matrix-limitations'],
  ['effectiveDate', 'matrix-effective-date'],
  ['reviewBy', 'matrix-review-by'],
];

/**
 * "Draft as an assumption" on a fit's factor-correlation matrix: the margin added to every
 * off-diagonal entry with its rationale, intended uses, limitations and dates. The server checks
 * that the value is a valid correlation matrix and answers each problem at its field.
 */
export type MatrixJudgementValues = { margin: number; marginRationale: string; intendedUses: string; limitations: string; effectiveDate: string; reviewBy: string };

export function MatrixDraftForm({
  fitId,
  today,
  complete,
  psd,
  edit,
}: {
  fitId: number;
  today: string;
  complete: boolean;
  psd: boolean;
  /** Editing a version's judgement (PATCH) instead of drafting from the fit. */
  edit?: { versionId: number; initial: MatrixJudgementValues };
}) {
  const router = useRouter();
  const init = edit?.initial;
  const [margin, setMargin] = useState(String(init?.margin ?? 0));
  const [rationale, setRationale] = useState(init?.marginRationale ?? '');
  const [intendedUses, setIntendedUses] = useState(init?.intendedUses ?? '');
  const [limitations, setLimitations] = useState(init?.limitations ?? '');
  const [effectiveDate, setEffectiveDate] = useState(init?.effectiveDate ?? today);
  const [reviewBy, setReviewBy] = useState(init?.reviewBy ?? '');
  const m = useMutation({
    mutationFn: async () => {
      const body = {
        margin: { value: margin.trim() === '' ? Number.NaN : Number(margin), rationale },
        intendedUses,
        limitations,
        effectiveDate,
        ...(reviewBy ? { reviewBy } : {}),
      };
      if (edit) {
        await apiSend('PATCH', `/api/factor-matrices/${edit.versionId}`, body);
        return edit.versionId;
      }
      return (await apiSend<{ id: number }>('POST', '/api/factor-matrices', { ...body, fitId })).id;
    },
    onSuccess: (id) => {
      router.push(`/library/matrices/${id}`);
      router.refresh();
    },
  });
  const problem = useMemo(() => problemOf(m.error), [m.error]);
  const { error, formMessage } = useFieldErrors(problem, FIELDS);
  if (!complete) {
    return <p className="text-sm text-[var(--color-muted)]">A pair without an estimate leaves the matrix incomplete: it cannot be drafted as an assumption.</p>;
  }
  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    m.mutate();
  };
  return (
    <details className="border-t border-[var(--color-line)] pt-3" data-testid="matrix-draft">
      <summary className="cursor-pointer font-medium">{edit ? 'Edit the judgement' : 'Draft as an assumption'}</summary>
      <form onSubmit={onSubmit} aria-label={edit ? 'Edit the matrix draft' : 'Draft the matrix as an assumption'} className="mt-3 space-y-3" noValidate>
        <p className="text-sm text-[var(--color-muted)]">
          {edit
            ? 'The evidence stays frozen; the value is recomputed from the margin and checked again. Editing a version after submission returns it to draft.'
            : `The pairs with their intervals, the ${psd ? 'estimated matrix' : 'nearest correlation matrix (the estimates are not positive semi-definite)'}, the dataset hash, the engine version and the seeds are copied and frozen. A validator who did not draft it reviews it; the scheduler publishes it on its effective date.`}{' '}
          {MARGIN_DIRECTION}
        </p>
        <div className="grid gap-3 md:grid-cols-[12rem_1fr]">
          <FormField id="matrix-margin" label="Margin added off the diagonal" error={error('matrix-margin')}>
            {(a) => <input {...a} className="field num" type="number" step="any" min="0" max="0.5" value={margin} onChange={(e) => setMargin(e.target.value)} />}
          </FormField>
          <FormField id="matrix-margin-rationale" label="Rationale of the margin" error={error('matrix-margin-rationale')}>
            {(a) => <textarea {...a} className="field" rows={2} value={rationale} onChange={(e) => setRationale(e.target.value)} />}
          </FormField>
        </div>
        <div className="grid gap-3 md:grid-cols-2">
          <FormField id="matrix-intended-uses" label="Intended uses" error={error('matrix-intended-uses')}>
            {(a) => <textarea {...a} className="field" rows={2} value={intendedUses} onChange={(e) => setIntendedUses(e.target.value)} />}
          </FormField>
          <FormField id="matrix-limitations" label="Limitations" error={error('matrix-limitations')}>
            {(a) => <textarea {...a} className="field" rows={2} value={limitations} onChange={(e) => setLimitations(e.target.value)} />}
          </FormField>
          <FormField id="matrix-effective-date" label="Effective date" error={error('matrix-effective-date')}>
            {(a) => <input {...a} className="field" type="date" value={effectiveDate} onChange={(e) => setEffectiveDate(e.target.value)} />}
          </FormField>
          <FormField id="matrix-review-by" label="Review by (empty: 12 months after the effective date, the maximum)" error={error('matrix-review-by')}>
            {(a) => <input {...a} className="field" type="date" value={reviewBy} onChange={(e) => setReviewBy(e.target.value)} />}
          </FormField>
        </div>
        <FormMessage message={formMessage} />
        <button type="submit" className="btn" disabled={m.isPending}>
          {edit ? 'Save changes' : 'Save draft'}
        </button>
      </form>
    </details>
  );
}
