'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { createModel, updateModel } from '@/lib/client/models';
import { AppError } from '@/lib/errors';

type Initial = { id: number; name: string; ownerName: string; contactEmail: string; intendedUse: string; webhookUrl: string | null; assumptionIds: number[] };

/**
 * Registers a consuming model, or changes one: owner, contact, intended use, the assumptions it
 * uses and its webhook URL. A new webhook secret is shown once, here.
 */
export function ModelForm({ choices, initial }: { choices: { id: number; segment: string }[]; initial?: Initial }) {
  const router = useRouter();
  const [chosen, setChosen] = useState<number[]>(initial?.assumptionIds ?? []);
  const [pending, setPending] = useState(false);
  const [errors, setErrors] = useState<{ message: string; fields: Record<string, string> } | null>(null);
  const [done, setDone] = useState<{ text: string; secret: string | null; href?: string } | null>(null);
  const err = (f: string) => errors?.fields[f];
  const aria = (f: string) => ({ 'aria-invalid': err(f) ? true : undefined, 'aria-describedby': err(f) ? `model-${f}-error` : undefined });
  const hint = (f: string) =>
    err(f) ? (
      <p id={`model-${f}-error`} className="mt-1 text-sm text-[var(--color-bad)]">
        {err(f)}
      </p>
    ) : null;
  return (
    <form
      aria-label={initial ? 'Change the model' : 'Register a model'}
      className="grid gap-3 md:grid-cols-2"
      onSubmit={async (e) => {
        e.preventDefault();
        const data = new FormData(e.currentTarget);
        const input = {
          name: String(data.get('name') ?? ''),
          ownerName: String(data.get('ownerName') ?? ''),
          contactEmail: String(data.get('contactEmail') ?? ''),
          intendedUse: String(data.get('intendedUse') ?? ''),
          webhookUrl: String(data.get('webhookUrl') ?? '') || null,
          assumptionIds: chosen,
        };
        setPending(true);
        setErrors(null);
        setDone(null);
        try {
          const r = initial ? await updateModel(initial.id, input) : await createModel(input);
          setDone({ text: initial ? 'Saved.' : `Registered “${r.model.name}”.`, secret: r.webhookSecret, href: initial ? undefined : `/models/${r.model.id}` });
          router.refresh();
        } catch (caught) {
          const a = caught instanceof AppError ? caught : new AppError('internal:unknown', 'The model could not be saved.');
          const fields = { ...((a.details?.fieldErrors as Record<string, string> | undefined) ?? {}) };
          if (typeof a.details?.field === 'string' && !fields[a.details.field]) fields[a.details.field] = a.message;
          setErrors({ message: a.message, fields });
          const first = Object.keys(fields)[0];
          if (first) (document.getElementById(`model-${first}`) as HTMLElement | null)?.focus();
        } finally {
          setPending(false);
        }
      }}
    >
      <div>
        <label className="label" htmlFor="model-name">
          Name
        </label>
        <input id="model-name" name="name" className="field" defaultValue={initial?.name} maxLength={160} required {...aria('name')} />
        {hint('name')}
      </div>
      <div>
        <label className="label" htmlFor="model-ownerName">
          Owner
        </label>
        <input id="model-ownerName" name="ownerName" className="field" defaultValue={initial?.ownerName} maxLength={120} required {...aria('ownerName')} />
        {hint('ownerName')}
      </div>
      <div>
        <label className="label" htmlFor="model-contactEmail">
          Contact e-mail (told of every change)
        </label>
        <input id="model-contactEmail" name="contactEmail" type="email" className="field" defaultValue={initial?.contactEmail} required {...aria('contactEmail')} />
        {hint('contactEmail')}
      </div>
      <div>
        <label className="label" htmlFor="model-webhookUrl">
          Webhook URL (optional: signed JSON events)
        </label>
        <input id="model-webhookUrl" name="webhookUrl" className="field" defaultValue={initial?.webhookUrl ?? ''} placeholder="https://models.example/hooks/rhobook" {...aria('webhookUrl')} />
        {hint('webhookUrl')}
      </div>
      <div className="md:col-span-2">
        <label className="label" htmlFor="model-intendedUse">
          Intended use of the value
        </label>
        <textarea id="model-intendedUse" name="intendedUse" className="field" rows={2} defaultValue={initial?.intendedUse} required {...aria('intendedUse')} />
        {hint('intendedUse')}
      </div>
      <fieldset className="md:col-span-2" aria-describedby={err('assumptionIds') ? 'model-assumptionIds-error' : undefined}>
        <legend className="label">Assumptions it uses</legend>
        {choices.length === 0 ? <p className="text-sm text-[var(--color-muted)]">No assumption has been drafted yet.</p> : null}
        <div className="flex flex-wrap gap-x-4 gap-y-1">
          {choices.map((c) => (
            <label key={c.id} className="flex items-center gap-2 text-sm">
              <input type="checkbox" checked={chosen.includes(c.id)} onChange={(e) => setChosen(e.target.checked ? [...chosen, c.id] : chosen.filter((x) => x !== c.id))} />
              {c.segment}
            </label>
          ))}
        </div>
        {hint('assumptionIds')}
      </fieldset>
      <div className="md:col-span-2">
        <button type="submit" className="btn" disabled={pending}>
          {initial ? 'Save changes' : 'Register the model'}
        </button>
      </div>
      {errors && !Object.keys(errors.fields).length ? (
        <p role="alert" className="notice-bad text-sm md:col-span-2">
          {errors.message}
        </p>
      ) : null}
      {done ? (
        <div role="status" className="notice-good text-sm md:col-span-2">
          {done.text}
          {done.href ? (
            <>
              {' '}
              <a href={done.href}>Open the model</a>.
            </>
          ) : null}
          {done.secret ? (
            <>
              {' '}
              Copy the webhook secret now; it is not shown again:
              <code className="mt-1 block break-all select-all" data-testid="webhook-secret">
                {done.secret}
              </code>
            </>
          ) : null}
        </div>
      ) : null}
    </form>
  );
}
