'use client';

import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useState, type FormEvent } from 'react';
import { apiSend } from '@/lib/client/api';

const scopes = [
  ['assumptions:read', 'Read published assumptions'],
  ['assumptions:export', 'Export the library as CSV'],
] as const;

/** Creates an API token (its secret is shown once) and revokes tokens. */
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
  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    setSecret(null);
    m.mutate();
  };
  return (
    <form onSubmit={onSubmit} aria-label="Create an API token" className="space-y-3">
      <div className="grid gap-3 md:grid-cols-3">
        <div>
          <label className="label" htmlFor="token-name">Name (who uses it)</label>
          <input id="token-name" className="field" value={name} onChange={(e) => setName(e.target.value)} />
        </div>
        <div>
          <label className="label" htmlFor="token-days">Expires after (days, empty: never)</label>
          <input id="token-days" className="field num" type="number" min="1" max="730" value={days} onChange={(e) => setDays(e.target.value)} />
        </div>
        <div>
          <label className="label" htmlFor="token-model">For the consuming model</label>
          <select id="token-model" className="field" value={modelId} onChange={(e) => setModelId(e.target.value)}>
            <option value="">(none)</option>
            {models.map((m) => (
              <option key={m.id} value={m.id}>
                {m.name}
              </option>
            ))}
          </select>
        </div>
        <fieldset>
          <legend className="label">Scopes</legend>
          {scopes.map(([s, label]) => (
            <label key={s} className="flex items-center gap-2 text-sm">
              <input
                type="checkbox"
                checked={chosen.includes(s)}
                onChange={(e) => setChosen(e.target.checked ? [...chosen, s] : chosen.filter((x) => x !== s))}
              />
              {label}
            </label>
          ))}
        </fieldset>
      </div>
      <button type="submit" className="btn" disabled={m.isPending}>
        Create token
      </button>
      {m.error ? (
        <p className="notice-bad text-sm" role="alert">
          {m.error.message}
        </p>
      ) : null}
      {secret ? (
        <div className="notice-good text-sm" role="status">
          Copy this token now; it is not shown again:
          <code className="mt-1 block break-all select-all" data-testid="new-token">
            {secret}
          </code>
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
