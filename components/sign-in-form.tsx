'use client';

import { signIn } from 'next-auth/react';
import { useRouter } from 'next/navigation';
import { useState, type FormEvent } from 'react';
import { FormField, FormMessage } from '@/components/forms/form-field';
import { useFieldErrors } from '@/components/forms/use-field-errors';
import { signInWaitMessage } from '@/lib/auth/throttle';
import type { FormFieldRef, FormProblem } from '@/lib/forms/place-errors';

const FIELDS: readonly FormFieldRef[] = [
  ['email', 'email'],
  ['password', 'password'],
];

const refused = 'The e-mail or password is not right, or the account is not active.';

/** The sentence for next-auth's error code: `refused`, or `rate-limited:<seconds to wait>`. */
function errorMessage(code: string | undefined): string {
  const wait = /^rate-limited:(\d+)$/.exec(code ?? '');
  if (!wait) return refused;
  return signInWaitMessage(Number(wait[1]));
}

/**
 * Sign-in: an empty field is named at the field; a refusal is said at the form (which of e-mail or
 * password was wrong is not told, on purpose).
 */
export function SignInForm({ callbackUrl }: { callbackUrl: string }) {
  const router = useRouter();
  const [problem, setProblem] = useState<FormProblem>(null);
  const [pending, setPending] = useState(false);
  const { error, formMessage } = useFieldErrors(problem, FIELDS);

  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    const email = String(form.get('email') ?? '').trim();
    const password = String(form.get('password') ?? '');
    const missing: Record<string, string> = {};
    if (!email) missing.email = 'Type the e-mail address of your account.';
    if (!password) missing.password = 'Type your password.';
    const first = Object.keys(missing)[0];
    if (first) return setProblem({ message: missing[first], field: first, fieldErrors: missing });
    setPending(true);
    setProblem(null);
    const res = await signIn('credentials', { email, password, redirect: false });
    setPending(false);
    if (!res || res.error) {
      setProblem({ message: errorMessage(res?.error ?? undefined) });
      return;
    }
    router.replace(callbackUrl);
    router.refresh();
  }

  return (
    <form onSubmit={onSubmit} className="space-y-4" noValidate aria-label="Sign in">
      <FormField id="email" label="E-mail" error={error('email')}>
        {(a) => <input {...a} name="email" type="email" autoComplete="username" className="field" />}
      </FormField>
      <FormField id="password" label="Password" error={error('password')}>
        {(a) => <input {...a} name="password" type="password" autoComplete="current-password" className="field" />}
      </FormField>
      <FormMessage message={formMessage} />
      <button type="submit" className="btn w-full justify-center" disabled={pending}>
        {pending ? 'Signing in…' : 'Sign in'}
      </button>
    </form>
  );
}
