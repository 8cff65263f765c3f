import type { Metadata } from 'next';
import Link from 'next/link';
import { forbidden } from 'next/navigation';
import { CreateUserForm } from '@/components/admin/create-user-form';
import { UserControls } from '@/components/admin/user-controls';
import { can, roleLabels } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { mailIsCaptured } from '@/lib/dal/outbox';
import { listAdminAudit, listUsers } from '@/lib/dal/users';
import { changeRoleAction, createUserAction, setActiveAction } from './actions';

export const metadata: Metadata = { title: 'Admin' };

export default async function AdminPage() {
  const actor = await requireUser();
  if (!can(actor.role, 'users:manage')) forbidden();
  const [users, audit] = await Promise.all([listUsers(actor), listAdminAudit(actor, 30)]);
  const usersById = new Map(users.map((u) => [u.id, u.email]));
  return (
    <div className="space-y-6">
      <h1>Admin</h1>
      <nav aria-label="Administration" className="flex flex-wrap gap-4 text-sm">
        <Link href="/admin/tokens">API tokens</Link>
        <Link href="/admin/policy">Overdue policy</Link>
        {mailIsCaptured() ? <Link href="/admin/outbox">Mail outbox (local capture)</Link> : null}
      </nav>
      <section className="panel p-5">
        <h2 className="mb-3">Users</h2>
        <div className="overflow-x-auto">
          <table className="table">
            <thead>
              <tr>
                <th>Name</th>
                <th>E-mail</th>
                <th>Role</th>
                <th>Status</th>
                <th>Change</th>
              </tr>
            </thead>
            <tbody>
              {users.map((u) => (
                <tr key={u.id} data-testid={`user-row-${u.email}`}>
                  <td>{u.name}</td>
                  <td>{u.email}</td>
                  <td>{roleLabels[u.role]}</td>
                  <td>
                    {u.active ? <span className="badge">active</span> : <span className="badge bg-[var(--color-bad-soft)] text-[var(--color-bad)]">deactivated</span>}
                    {u.mustChangePassword ? <span className="ml-1 text-xs text-[var(--color-muted)]">invited</span> : null}
                  </td>
                  <td>
                    <UserControls userId={u.id} role={u.role} active={u.active} self={u.id === actor.id} changeRole={changeRoleAction} setActive={setActiveAction} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>
      <section className="panel p-5">
        <h2 className="mb-3">Add a user</h2>
        <CreateUserForm action={createUserAction} />
      </section>
      <section className="panel p-5">
        <h2 className="mb-3">Administration log</h2>
        <p className="mb-2 text-sm text-[var(--color-muted)]">Append-only: the database refuses changes to these rows.</p>
        <table className="table">
          <thead>
            <tr>
              <th>When (UTC)</th>
              <th>Who</th>
              <th>Action</th>
              <th>Target</th>
              <th>Before → after</th>
            </tr>
          </thead>
          <tbody>
            {audit.map((a) => (
              <tr key={a.id}>
                <td className="num whitespace-nowrap">{a.at.replace('T', ' ').slice(0, 19)}</td>
                <td>{a.actorEmail}</td>
                <td>{a.action}</td>
                <td>
                  {a.targetType === 'user' && usersById.has(Number(a.targetId)) ? usersById.get(Number(a.targetId)) : `${a.targetType} ${a.targetId}`}
                </td>
                <td className="num text-xs">
                  {a.before ? JSON.stringify(a.before) : '—'} → {a.after ? JSON.stringify(a.after) : '—'}
                </td>
              </tr>
            ))}
            {audit.length === 0 ? (
              <tr>
                <td colSpan={5} className="text-[var(--color-muted)]">
                  No administrative changes yet.
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </section>
    </div>
  );
}
