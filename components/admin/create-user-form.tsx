'use client';

import { useActionState, useMemo, useState } from 'react';
import { initialFormState } from '@/components/form-state';
import { FormField, FormMessage } from '@/components/forms/form-field';
import { useFieldErrors } from '@/components/forms/use-field-errors';
import { problemOf, type FormFieldRef } from '@/lib/forms/place-errors';
import type { AdminActionState } from './action-state';

const FIELDS: readonly FormFieldRef[] = [
  ['email', 'new-email'],
  ['name', 'new-name'],
  ['role', 'new-role'],
  ['mode', 'mode-password'],
  ['password', 'new-password'],
];

type Action = (prev: AdminActionState, form: FormData) => Promise<AdminActionState>;

export function CreateUserForm({ action }: { action: Action }) {
  const [state, formAction, pending] = useActionState<AdminActionState, FormData>(action, initialFormState);
  const [mode, setMode] = useState<'password' | 'invitation'>('password');
  const problem = useMemo(() => problemOf(state), [state]);
  const { error, formMessage } = useFieldErrors(problem, FIELDS);
  return (
    <form action={formAction} className="grid gap-3 md:grid-cols-2" aria-label="Create a user" noValidate>
      <FormField id="new-email" label="E-mail" error={error('new-email')}>
        {(a) => <input {...a} name="email" type="email" className="field" />}
      </FormField>
      <FormField id="new-name" label="Name" error={error('new-name')}>
        {(a) => <input {...a} name="name" className="field" />}
      </FormField>
      <FormField id="new-role" label="Role" error={error('new-role')}>
        {(a) => (
          <select {...a} name="role" className="field" defaultValue="viewer">
            <option value="viewer">Viewer</option>
            <option value="analyst">Analyst</option>
            <option value="validator">Validator</option>
            <option value="admin">Administrator</option>
          </select>
        )}
      </FormField>
      <fieldset>
        <legend className="label">First sign-in</legend>
        <div className="flex gap-4 pt-1 text-sm">
          <label className="flex items-center gap-1.5">
            <input id="mode-password" type="radio" name="mode" value="password" checked={mode === 'password'} onChange={() => setMode('password')} />
            Set an initial password
          </label>
          <label className="flex items-center gap-1.5">
            <input type="radio" name="mode" value="invitation" checked={mode === 'invitation'} onChange={() => setMode('invitation')} />
            Invitation (one-time password)
          </label>
        </div>
      </fieldset>
      {mode === 'password' ? (
        <FormField id="new-password" label="Initial password (10 characters or more)" error={error('new-password')}>
          {(a) => <input {...a} name="password" type="password" autoComplete="new-password" className="field" />}
        </FormField>
      ) : null}
      <div className="flex items-end">
        <button type="submit" className="btn" disabled={pending}>
          {pending ? 'Creating…' : 'Create user'}
        </button>
      </div>
      <div className="md:col-span-2">
        <FormMessage message={formMessage} />
      </div>
      {state.ok && state.message ? (
        <div role="status" className="notice-good text-sm md:col-span-2">
          {state.message}
          {state.temporaryPassword ? (
            <div className="mt-1">
              One-time password: <code data-testid="temporary-password">{state.temporaryPassword}</code> (shown once)
            </div>
          ) : null}
        </div>
      ) : null}
    </form>
  );
}
