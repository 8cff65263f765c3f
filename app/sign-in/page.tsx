import type { Metadata } from 'next';
import { redirect } from 'next/navigation';
import { SignInForm } from '@/components/sign-in-form';
import { safeCallbackPath } from '@/lib/auth/callback-url';
import { getCurrentUser } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Sign in' };

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const params = await searchParams;
  // Only a path of this application, after URL parsing: never another host (lib/auth/callback-url.ts).
  const callbackUrl = safeCallbackPath(params.callbackUrl);
  if (await getCurrentUser()) redirect(callbackUrl);
  return (
    <main className="mx-auto flex min-h-screen max-w-md flex-col justify-center px-6">
      <div className="mb-6">
        <div className="text-2xl font-semibold tracking-tight">
          <span className="text-[var(--color-accent)]">ρ</span> Rhobook
        </div>
        <p className="mt-1 text-sm text-[var(--color-muted)]">
          Asset-correlation estimates, their evidence and their approval, in one place.
        </p>
      </div>
      <div className="panel p-6">
        <h1 className="mb-4">Sign in</h1>
        {params.changed === '1' ? (
          <p role="status" className="notice-good mb-4 text-sm">
            Your password has been changed and every session of your account has ended. Sign in with the new password.
          </p>
        ) : null}
        <SignInForm callbackUrl={callbackUrl} />
      </div>
    </main>
  );
}
