'use client';

import { useActionState } from 'react';
import { initialFormState, type FormState } from '@/components/form-state';

export function ChangePasswordForm({ action }: { action: (prev: FormState, form: FormData) => Promise<FormState> }) {
  const [state, formAction, pending] = useActionState(action, initialFormState);
  return (
    <form action={formAction} className="max-w-sm space-y-3" aria-label="Change password">
      <div>
        <label className="label" htmlFor="current">Current password</label>
        <input id="current" name="current" type="password" autoComplete="current-password" className="field" required />
      </div>
      <div>
        <label className="label" htmlFor="password">New password (10 characters or more)</label>
        <input id="password" name="password" type="password" autoComplete="new-password" className="field" required />
      </div>
      <div>
        <label className="label" htmlFor="confirm">Repeat the new password</label>
        <input id="confirm" name="confirm" type="password" autoComplete="new-password" className="field" required />
      </div>
      <button type="submit" className="btn" disabled={pending}>
        {pending ? 'Saving…' : 'Change password'}
      </button>
      {state.message ? <p role="status" className={`text-sm ${state.ok ? 'notice-good' : 'notice-bad'}`}>{state.message}</p> : null}
    </form>
  );
}
