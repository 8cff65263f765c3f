'use client';

import { useActionState, useMemo } from 'react';
import { initialFormState, type FormState } from '@/components/form-state';
import { FormField, FormMessage } from '@/components/forms/form-field';
import { useFieldErrors } from '@/components/forms/use-field-errors';
import { problemOf, type FormFieldRef } from '@/lib/forms/place-errors';

const FIELDS: readonly FormFieldRef[] = [
  ['current', 'current'],
  ['password', 'password'],
  ['confirm', 'confirm'],
];

/** Changes the signed-in person's password; each refusal is shown at its field. */
export function ChangePasswordForm({ action }: { action: (prev: FormState, form: FormData) => Promise<FormState> }) {
  const [state, formAction, pending] = useActionState(action, initialFormState);
  const problem = useMemo(() => problemOf(state), [state]);
  const { error, formMessage } = useFieldErrors(problem, FIELDS);
  return (
    <form action={formAction} className="max-w-sm space-y-3" aria-label="Change password" noValidate>
      <FormField id="current" label="Current password" error={error('current')}>
        {(a) => <input {...a} name="current" type="password" autoComplete="current-password" className="field" />}
      </FormField>
      <FormField id="password" label="New password (10 characters or more)" error={error('password')}>
        {(a) => <input {...a} name="password" type="password" autoComplete="new-password" className="field" />}
      </FormField>
      <FormField id="confirm" label="Repeat the new password" error={error('confirm')}>
        {(a) => <input {...a} name="confirm" type="password" autoComplete="new-password" className="field" />}
      </FormField>
      <button type="submit" className="btn" disabled={pending}>
        {pending ? 'Saving…' : 'Change password'}
      </button>
      <FormMessage message={formMessage} />
      {state.ok && state.message ? (
        <p role="status" className="notice-good text-sm">
          {state.message}
        </p>
      ) : null}
    </form>
  );
}
