import type { Metadata } from 'next';
import { ChangePasswordForm } from '@/components/change-password-form';
import { roleDescriptions, roleLabels } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { mustChangeOwnPassword } from '@/lib/dal/users';
import { changePasswordAction } from './actions';

export const metadata: Metadata = { title: 'Your account' };

export default async function AccountPage() {
  const user = await requireUser();
  const mustChange = await mustChangeOwnPassword(user);
  return (
    <div className="space-y-6">
      <h1>Your account</h1>
      <section className="panel p-5">
        <p>
          {user.name} · {user.email} · <span className="badge">{roleLabels[user.role]}</span>
        </p>
        <p className="mt-1 text-sm text-[var(--color-muted)]">{roleDescriptions[user.role]}</p>
      </section>
      <section className="panel p-5">
        <h2 className="mb-3">Password</h2>
        {mustChange ? (
          <p className="notice-caution mb-3 text-sm">You signed in with a one-time password. Choose your own now.</p>
        ) : null}
        <ChangePasswordForm action={changePasswordAction} />
      </section>
    </div>
  );
}
