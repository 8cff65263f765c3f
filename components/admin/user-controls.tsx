'use client';

import { useActionState } from 'react';
import { initialFormState } from '@/components/form-state';
import type { AdminActionState } from './action-state';

type Action = (prev: AdminActionState, form: FormData) => Promise<AdminActionState>;

export function UserControls({
  userId,
  role,
  active,
  self = false,
  changeRole,
  setActive,
}: {
  userId: number;
  role: string;
  active: boolean;
  /** The signed-in administrator's own row: their role is changed by another administrator. */
  self?: boolean;
  changeRole: Action;
  setActive: Action;
}) {
  const [roleState, roleAction, rolePending] = useActionState(changeRole, initialFormState);
  const [activeState, activeAction, activePending] = useActionState(setActive, initialFormState);
  const message = roleState.message ?? activeState.message;
  const ok = roleState.message ? roleState.ok : activeState.ok;
  return (
    <div className="space-y-1">
      <div className="flex flex-wrap items-center gap-2">
        {self ? (
          <span className="text-xs text-[var(--color-muted)]">Your own role is changed by another administrator.</span>
        ) : (
          <form action={roleAction} className="flex items-center gap-1">
            <input type="hidden" name="userId" value={userId} />
            <label className="sr-only" htmlFor={`role-${userId}`}>Role</label>
            <select
              id={`role-${userId}`}
              name="role"
              defaultValue={role}
              className="field w-auto py-1 text-sm"
              aria-invalid={roleState.message && !roleState.ok ? true : undefined}
              aria-describedby={roleState.message ? `role-${userId}-message` : undefined}
            >
              <option value="viewer">Viewer</option>
              <option value="analyst">Analyst</option>
              <option value="validator">Validator</option>
              <option value="admin">Administrator</option>
            </select>
            <button type="submit" className="btn btn-quiet px-2 py-1 text-sm" disabled={rolePending}>
              Change role
            </button>
          </form>
        )}
        <form action={activeAction}>
          <input type="hidden" name="userId" value={userId} />
          <input type="hidden" name="active" value={active ? 'false' : 'true'} />
          <button type="submit" className={`btn px-2 py-1 text-sm ${active ? 'btn-danger' : 'btn-quiet'}`} disabled={activePending}>
            {active ? 'Deactivate' : 'Reactivate'}
          </button>
        </form>
      </div>
      {message ? (
        <p id={`role-${userId}-message`} className={`text-xs ${ok ? 'text-[var(--color-good)]' : 'field-error'}`} role="status">
          {message}
        </p>
      ) : null}
    </div>
  );
}
