'use client';

import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useMemo, useState, type FormEvent } from 'react';
import { CopyButton } from '@/components/copy-button';
import { FieldError, FormField, FormMessage } from '@/components/forms/form-field';
import { useFieldErrors } from '@/components/forms/use-field-errors';
import { apiSend } from '@/lib/client/api';
import { problemOf, type FormFieldRef } from '@/lib/forms/place-errors';

const FIELDS: readonly FormFieldRef[] = [
  ['name', 'token-name'],
  ['expiresInDays', 'token-days'],
  ['scopes', 'token-scope-0'],
];

const scopes = [
  ['assumptions:read', 'Read published assumptions'],
  ['assumptions:export', 'Export the library as CSV'],
] as const;

/** Creates an API token (its secret is shown once, with a button that copies it), optionally tied to a consuming model. */
export function CreateTokenForm({ models = [] }: { models?: { id: number; name: string }[] }) {
  const router = useRouter();
  const [name, setName] = useState('');
  const [modelId, setModelId] = useState('');
  const [chosen, setChosen] = useState<string[]>(['assumptions:read']);
  const [days, setDays] = useState('365');
  const [secret, setSecret] = useState<string | null>(null);
  const m = useMutation({
    mutationFn: () =>
      apiSend<{ token: string }>('POST', '/api/admin/tokens', {
        name,
        scopes: chosen,
        expiresInDays: days ? Number(days) : null,
        modelId: modelId ? Number(modelId) : null,
      }),
    onSuccess: (r) => {
      setSecret(r.token);
      setName('');
      router.refresh();
    },
  });
  const problem = useMemo(() => problemOf(m.error), [m.error]);
  const { error, formMessage } = useFieldErrors(problem, FIELDS);
  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    setSecret(null);
    m.mutate();
  };
  return (
    <form onSubmit={onSubmit} aria-label="Create an API token" className="space-y-3" noValidate>
      <div className="grid gap-3 md:grid-cols-3">
        <FormField id="token-name" label="Name (who uses it)" error={error('token-name')}>
          {(a) => <input {...a} className="field" value={name} onChange={(e) => setName(e.target.value)} />}
        </FormField>
        <FormField id="token-days" label="Expires after (days, empty: never)" error={error('token-days')}>
          {(a) => <input {...a} className="field num" type="number" min="1" max="730" value={days} onChange={(e) => setDays(e.target.value)} />}
        </FormField>
        <FormField id="token-model" label="For the consuming model" error={error('token-model')}>
          {(a) => (
            <select {...a} className="field" value={modelId} onChange={(e) => setModelId(e.target.value)}>
              <option value="">(none)</option>
              {models.map((m) => (
                <option key={m.id} value={m.id}>
                  {m.name}
                </option>
              ))}
            </select>
          )}
        </FormField>
        <fieldset aria-describedby={error('token-scope-0') ? 'token-scope-0-error' : undefined}>
          <legend className="label">Scopes</legend>
          {scopes.map(([s, label], i) => (
            <label key={s} className="flex items-center gap-2 text-sm">
              <input
                id={i === 0 ? 'token-scope-0' : undefined}
                type="checkbox"
                aria-invalid={error('token-scope-0') ? true : undefined}
                checked={chosen.includes(s)}
                onChange={(e) => setChosen(e.target.checked ? [...chosen, s] : chosen.filter((x) => x !== s))}
              />
              {label}
            </label>
          ))}
          <FieldError id="token-scope-0" error={error('token-scope-0')} />
        </fieldset>
      </div>
      <button type="submit" className="btn" disabled={m.isPending}>
        Create token
      </button>
      <FormMessage message={formMessage} />
      {secret ? (
        <div className="notice-good space-y-1 text-sm" role="status">
          <p>Copy this token now; it is not shown again:</p>
          <code id="new-token" className="block break-all select-all" data-testid="new-token">
            {secret}
          </code>
          <CopyButton text={secret} targetId="new-token" label="Copy the token" />
        </div>
      ) : null}
    </form>
  );
}

export function RevokeTokenButton({ id, name }: { id: number; name: string }) {
  const router = useRouter();
  const m = useMutation({ mutationFn: () => apiSend('DELETE', `/api/admin/tokens/${id}`), onSuccess: () => router.refresh() });
  return (
    <span>
      <button type="button" className="btn btn-danger px-2 py-1 text-sm" disabled={m.isPending} onClick={() => {
          if (window.confirm(`Revoke the token “${name}”? Requests that use it are refused from now on; this cannot be undone.`)) m.mutate();
        }}
        aria-label={`Revoke ${name}`}>
        Revoke
      </button>
      {m.error ? (
        <span role="alert" className="ml-2 text-xs text-[var(--color-bad)]">
          {m.error.message}
        </span>
      ) : null}
    </span>
  );
}
