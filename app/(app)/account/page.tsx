import type { Metadata } from 'next';
import { ChangePasswordForm } from '@/components/change-password-form';
import { roleDescriptions, roleLabels } from '@/lib/auth/permissions';
import { mustChangePassword, requireSignedIn } from '@/lib/auth/session';
import { changePasswordAction } from './actions';

export const metadata: Metadata = { title: 'Your account' };

export default async function AccountPage() {
  const user = await requireSignedIn();
  const mustChange = await mustChangePassword();
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
          <p className="notice-caution mb-3 text-sm" role="alert">
            You signed in with a one-time password. Choose your own now: nothing else works until you have.
          </p>
        ) : null}
        <ChangePasswordForm action={changePasswordAction} />
      </section>
    </div>
  );
}
