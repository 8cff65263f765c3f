import type { Metadata } from 'next';
import Link from 'next/link';
import { forbidden } from 'next/navigation';
import { CreateTokenForm, RevokeTokenButton } from '@/components/admin/token-manager';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { listModelChoices } from '@/lib/dal/models';
import { listTokens } from '@/lib/dal/tokens';

export const metadata: Metadata = { title: 'API tokens' };

const day = (s: string | null) => (s ? s.replace('T', ' ').slice(0, 16) : '—');

export default async function TokensPage() {
  const actor = await requireUser();
  if (!can(actor.role, 'tokens:manage')) forbidden();
  const [tokens, models] = await Promise.all([listTokens(actor), listModelChoices(actor)]);
  return (
    <div className="space-y-5">
      <p className="text-sm">
        <Link href="/admin">Admin</Link> / API tokens
      </p>
      <h1>API tokens</h1>
      <p className="max-w-3xl text-sm text-[var(--color-muted)]">
        Downstream models read published assumptions through <code>/api/v1</code> with a bearer token (see the{' '}
        <a href="/api/openapi.json">OpenAPI document</a>). Only a hash of each token is stored; a revoked token is refused at once.
      </p>
      <section className="panel p-5">
        <h2 className="mb-3">Create a token</h2>
        <CreateTokenForm models={models} />
      </section>
      <section className="panel overflow-x-auto p-2">
        <table className="table" aria-label="API tokens">
          <thead>
            <tr>
              <th>Name</th>
              <th>Starts with</th>
              <th>Scopes</th>
              <th>Model</th>
              <th>Created (UTC)</th>
              <th>Expires</th>
              <th>Last used</th>
              <th>State</th>
              <th />
            </tr>
          </thead>
          <tbody>
            {tokens.map((t) => (
              <tr key={t.id} data-testid={`token-row-${t.id}`}>
                <td>{t.name}</td>
                <td className="num">{t.prefix}…</td>
                <td>{t.scopes.join(', ')}</td>
                <td>{t.model ? <Link href={`/models/${t.model.id}`}>{t.model.name}</Link> : '—'}</td>
                <td className="num whitespace-nowrap">
                  {day(t.createdAt)} <span className="text-xs text-[var(--color-muted)]">{t.createdBy}</span>
                </td>
                <td className="num whitespace-nowrap">{day(t.expiresAt)}</td>
                <td className="num whitespace-nowrap">{day(t.lastUsedAt)}</td>
                <td>
                  <span className={`badge ${t.status === 'active' ? '' : 'bg-[var(--color-bad-soft)] text-[var(--color-bad)]'}`}>{t.status}</span>
                </td>
                <td>{t.status === 'active' ? <RevokeTokenButton id={t.id} name={t.name} /> : null}</td>
              </tr>
            ))}
            {tokens.length === 0 ? (
              <tr>
                <td colSpan={9} className="text-[var(--color-muted)]">
                  No tokens yet.
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </section>
    </div>
  );
}
