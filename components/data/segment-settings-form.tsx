'use client';

import { useActionState, useMemo, useState } from 'react';
import { initialFormState, type FormState } from '@/components/form-state';
import { FormField, FormMessage } from '@/components/forms/form-field';
import { useFieldErrors } from '@/components/forms/use-field-errors';
import type { AssetClass } from '@/db/schema';
import type { SegmentDto } from '@/lib/dal/segments';
import { problemOf, type FormFieldRef } from '@/lib/forms/place-errors';

type Action = (prev: FormState, form: FormData) => Promise<FormState>;

const FIELDS: readonly FormFieldRef[] = [
  ['assetClass', 'seg-class'],
  ['turnoverEurMillions', 'seg-turnover'],
  ['description', 'seg-description'],
  ['ownerId', 'seg-owner'],
];

/** A segment's settings: asset class (the supervisory benchmark), SME turnover, description, owner. */
export function SegmentSettingsForm({
  segment,
  owners,
  labels,
  action,
}: {
  segment: SegmentDto;
  owners: { id: number; name: string }[];
  labels: Record<AssetClass, string>;
  action: Action;
}) {
  const [state, formAction, pending] = useActionState(action, initialFormState);
  const [assetClass, setAssetClass] = useState<AssetClass>(segment.assetClass);
  const problem = useMemo(() => problemOf(state), [state]);
  const { error, formMessage } = useFieldErrors(problem, FIELDS);
  return (
    <form action={formAction} className="grid gap-3" aria-label="Segment settings" noValidate>
      <input type="hidden" name="segmentId" value={segment.id} />
      <FormField id="seg-class" label="Asset class (supervisory benchmark)" error={error('seg-class')}>
        {(a) => (
          <select {...a} name="assetClass" className="field" value={assetClass} onChange={(e) => setAssetClass(e.target.value as AssetClass)}>
            {(Object.keys(labels) as AssetClass[]).map((k) => (
              <option key={k} value={k}>
                {labels[k]}
              </option>
            ))}
          </select>
        )}
      </FormField>
      {assetClass === 'sme-corporate' ? (
        <FormField id="seg-turnover" label="Typical annual turnover, EUR millions (below 50; below 5 counts as 5)" error={error('seg-turnover')}>
          {(a) => (
            <input {...a} name="turnoverEurMillions" type="number" step="any" min="0" max="50" defaultValue={segment.turnoverEurMillions ?? ''} className="field" />
          )}
        </FormField>
      ) : null}
      <FormField id="seg-description" label="Description" error={error('seg-description')}>
        {(a) => <textarea {...a} name="description" rows={3} maxLength={2000} defaultValue={segment.description ?? ''} className="field" />}
      </FormField>
      <FormField id="seg-owner" label="Owner" error={error('seg-owner')}>
        {(a) => (
          <select {...a} name="ownerId" className="field" defaultValue={segment.owner?.id ?? ''}>
            <option value="">No owner</option>
            {owners.map((o) => (
              <option key={o.id} value={o.id}>
                {o.name}
              </option>
            ))}
          </select>
        )}
      </FormField>
      <div>
        <button type="submit" className="btn" disabled={pending}>
          {pending ? 'Saving…' : 'Save settings'}
        </button>
      </div>
      <FormMessage message={formMessage} />
      {state.ok && state.message ? (
        <p role="status" className="notice-good text-sm">
          {state.message}
        </p>
      ) : null}
    </form>
  );
}
