'use client';

import { signIn } from 'next-auth/react';
import { useRouter } from 'next/navigation';
import { useState, type FormEvent } from 'react';
import { signInWaitMessage } from '@/lib/auth/throttle';

const refused = 'The e-mail or password is not right, or the account is not active.';

/** The sentence for next-auth's error code: `refused`, or `rate-limited:<seconds to wait>`. */
function errorMessage(code: string | undefined): string {
  const wait = /^rate-limited:(\d+)$/.exec(code ?? '');
  if (!wait) return refused;
  return signInWaitMessage(Number(wait[1]));
}

export function SignInForm({ callbackUrl }: { callbackUrl: string }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [pending, setPending] = useState(false);

  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setPending(true);
    setError(null);
    const res = await signIn('credentials', {
      email: String(form.get('email') ?? ''),
      password: String(form.get('password') ?? ''),
      redirect: false,
    });
    setPending(false);
    if (!res || res.error) {
      setError(errorMessage(res?.error ?? undefined));
      return;
    }
    router.replace(callbackUrl);
    router.refresh();
  }

  return (
    <form onSubmit={onSubmit} className="space-y-4" noValidate>
      <div>
        <label className="label" htmlFor="email">
          E-mail
        </label>
        <input id="email" name="email" type="email" autoComplete="username" required className="field" />
      </div>
      <div>
        <label className="label" htmlFor="password">
          Password
        </label>
        <input id="password" name="password" type="password" autoComplete="current-password" required className="field" />
      </div>
      {error ? (
        <p role="alert" className="notice-bad text-sm">
          {error}
        </p>
      ) : null}
      <button type="submit" className="btn w-full justify-center" disabled={pending}>
        {pending ? 'Signing in…' : 'Sign in'}
      </button>
    </form>
  );
}
