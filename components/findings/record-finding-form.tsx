'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import type { FindingTarget } from '@/db/schema';
import { recordFinding } from '@/lib/client/findings';
import { AppError } from '@/lib/errors';

type Owner = { id: number; name: string; role: string };

/** A validator records a finding on one target; each field's error is shown beside it. */
export function RecordFindingForm({ target, owners, defaultDue }: { target: { type: FindingTarget; id: number }; owners: Owner[]; defaultDue: string }) {
  const router = useRouter();
  const [open, setOpen] = useState(false);
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<{ message: string; fields: Record<string, string> } | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const fieldError = (name: string) => error?.fields[name];
  const aria = (name: string) => ({
    'aria-invalid': fieldError(name) ? true : undefined,
    'aria-describedby': fieldError(name) ? `finding-${name}-error` : undefined,
  });
  const errorText = (name: string) =>
    fieldError(name) ? (
      <p id={`finding-${name}-error`} className="mt-1 text-sm text-[var(--color-bad)]">
        {fieldError(name)}
      </p>
    ) : null;
  if (!open) {
    return (
      <div className="flex items-center gap-3">
        <button type="button" className="btn btn-quiet" onClick={() => setOpen(true)}>
          Record a finding
        </button>
        {done ? (
          <p role="status" className="text-sm text-[var(--color-good)]">
            {done}
          </p>
        ) : null}
      </div>
    );
  }
  return (
    <form
      aria-label="Record a finding"
      className="grid gap-3 md:grid-cols-2"
      onSubmit={async (e) => {
        e.preventDefault();
        const data = new FormData(e.currentTarget);
        setPending(true);
        setError(null);
        try {
          const f = await recordFinding({
            targetType: target.type,
            targetId: target.id,
            title: String(data.get('title') ?? ''),
            description: String(data.get('description') ?? ''),
            severity: String(data.get('severity') ?? '') as 'high',
            ownerId: Number(data.get('ownerId')),
            dueDate: String(data.get('dueDate') ?? ''),
          });
          setDone(`Recorded finding ${f.id}.`);
          setOpen(false);
          router.refresh();
        } catch (err) {
          const e2 = err instanceof AppError ? err : new AppError('internal:unknown', 'The finding could not be saved.');
          const fields = { ...((e2.details?.fieldErrors as Record<string, string> | undefined) ?? {}) };
          if (typeof e2.details?.field === 'string' && !fields[e2.details.field]) fields[e2.details.field] = e2.message;
          setError({ message: e2.message, fields });
          const first = Object.keys(fields)[0];
          if (first) (document.getElementById(`finding-${first}`) as HTMLElement | null)?.focus();
        } finally {
          setPending(false);
        }
      }}
    >
      <div className="md:col-span-2">
        <label className="label" htmlFor="finding-title">
          Title
        </label>
        <input id="finding-title" name="title" className="field" maxLength={200} required {...aria('title')} />
        {errorText('title')}
      </div>
      <div className="md:col-span-2">
        <label className="label" htmlFor="finding-description">
          Description (what is wrong and what is expected)
        </label>
        <textarea id="finding-description" name="description" className="field" rows={4} required {...aria('description')} />
        {errorText('description')}
      </div>
      <div>
        <label className="label" htmlFor="finding-severity">
          Severity
        </label>
        <select id="finding-severity" name="severity" className="field" defaultValue="medium" {...aria('severity')}>
          <option value="high">high (blocks approval until closed or accepted)</option>
          <option value="medium">medium</option>
          <option value="low">low</option>
        </select>
        {errorText('severity')}
      </div>
      <div>
        <label className="label" htmlFor="finding-ownerId">
          Owner
        </label>
        <select id="finding-ownerId" name="ownerId" className="field" {...aria('ownerId')}>
          {owners.map((o) => (
            <option key={o.id} value={o.id}>
              {o.name} ({o.role})
            </option>
          ))}
        </select>
        {errorText('ownerId')}
      </div>
      <div>
        <label className="label" htmlFor="finding-dueDate">
          Due date
        </label>
        <input id="finding-dueDate" name="dueDate" type="date" className="field" defaultValue={defaultDue} required {...aria('dueDate')} />
        {errorText('dueDate')}
      </div>
      <div className="flex items-end gap-2">
        <button type="submit" className="btn" disabled={pending}>
          Record
        </button>
        <button type="button" className="btn btn-quiet" onClick={() => setOpen(false)}>
          Cancel
        </button>
      </div>
      {error && !Object.keys(error.fields).length ? (
        <p role="alert" className="notice-bad text-sm md:col-span-2">
          {error.message}
        </p>
      ) : null}
    </form>
  );
}
