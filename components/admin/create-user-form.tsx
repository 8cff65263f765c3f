'use client';

import { useActionState, useState } from 'react';
import { initialFormState } from '@/components/form-state';
import type { AdminActionState } from './action-state';

type Action = (prev: AdminActionState, form: FormData) => Promise<AdminActionState>;

export function CreateUserForm({ action }: { action: Action }) {
  const [state, formAction, pending] = useActionState<AdminActionState, FormData>(action, initialFormState);
  const [mode, setMode] = useState<'password' | 'invitation'>('password');
  return (
    <form action={formAction} className="grid gap-3 md:grid-cols-2" aria-label="Create a user">
      <div>
        <label className="label" htmlFor="new-email">E-mail</label>
        <input id="new-email" name="email" type="email" required className="field" />
      </div>
      <div>
        <label className="label" htmlFor="new-name">Name</label>
        <input id="new-name" name="name" required className="field" />
      </div>
      <div>
        <label className="label" htmlFor="new-role">Role</label>
        <select id="new-role" name="role" className="field" defaultValue="viewer">
          <option value="viewer">Viewer</option>
          <option value="analyst">Analyst</option>
          <option value="validator">Validator</option>
          <option value="admin">Administrator</option>
        </select>
      </div>
      <fieldset>
        <legend className="label">First sign-in</legend>
        <div className="flex gap-4 pt-1 text-sm">
          <label className="flex items-center gap-1.5">
            <input type="radio" name="mode" value="password" checked={mode === 'password'} onChange={() => setMode('password')} />
            Set an initial password
          </label>
          <label className="flex items-center gap-1.5">
            <input type="radio" name="mode" value="invitation" checked={mode === 'invitation'} onChange={() => setMode('invitation')} />
            Invitation (one-time password)
          </label>
        </div>
      </fieldset>
      {mode === 'password' ? (
        <div>
          <label className="label" htmlFor="new-password">Initial password (10 characters or more)</label>
          <input id="new-password" name="password" type="password" autoComplete="new-password" className="field" />
        </div>
      ) : null}
      <div className="flex items-end">
        <button type="submit" className="btn" disabled={pending}>
          {pending ? 'Creating…' : 'Create user'}
        </button>
      </div>
      {state.message ? (
        <div role="status" className={`md:col-span-2 text-sm ${state.ok ? 'notice-good' : 'notice-bad'}`}>
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
