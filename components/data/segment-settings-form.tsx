'use client';

import { useActionState, useState } from 'react';
import { initialFormState, type FormState } from '@/components/form-state';
import type { AssetClass } from '@/db/schema';
import type { SegmentDto } from '@/lib/dal/segments';

type Action = (prev: FormState, form: FormData) => Promise<FormState>;

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
  return (
    <form action={formAction} className="grid gap-3" aria-label="Segment settings">
      <input type="hidden" name="segmentId" value={segment.id} />
      <div>
        <label className="label" htmlFor="seg-class">Asset class (supervisory benchmark)</label>
        <select id="seg-class" name="assetClass" className="field" value={assetClass} onChange={(e) => setAssetClass(e.target.value as AssetClass)}>
          {(Object.keys(labels) as AssetClass[]).map((k) => (
            <option key={k} value={k}>
              {labels[k]}
            </option>
          ))}
        </select>
      </div>
      {assetClass === 'sme-corporate' ? (
        <div>
          <label className="label" htmlFor="seg-turnover">Typical annual turnover, EUR millions (below 50; below 5 counts as 5)</label>
          <input
            id="seg-turnover"
            name="turnoverEurMillions"
            type="number"
            step="any"
            min="0"
            max="50"
            defaultValue={segment.turnoverEurMillions ?? ''}
            className="field"
            aria-invalid={state.field === 'turnoverEurMillions' || undefined}
          />
        </div>
      ) : null}
      <div>
        <label className="label" htmlFor="seg-description">Description</label>
        <textarea id="seg-description" name="description" rows={3} maxLength={2000} defaultValue={segment.description ?? ''} className="field" />
      </div>
      <div>
        <label className="label" htmlFor="seg-owner">Owner</label>
        <select id="seg-owner" name="ownerId" className="field" defaultValue={segment.owner?.id ?? ''}>
          <option value="">No owner</option>
          {owners.map((o) => (
            <option key={o.id} value={o.id}>
              {o.name}
            </option>
          ))}
        </select>
      </div>
      <div>
        <button type="submit" className="btn" disabled={pending}>
          {pending ? 'Saving…' : 'Save settings'}
        </button>
      </div>
      {state.message ? (
        <p role="status" className={`text-sm ${state.ok ? 'notice-good' : 'notice-bad'}`}>
          {state.message}
        </p>
      ) : null}
    </form>
  );
}
