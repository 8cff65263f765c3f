'use server';

import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import { roles } from '@/db/schema';
import { assertSameOriginAction } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { changeRole, createUser, setUserActive } from '@/lib/dal/users';
import { AppError } from '@/lib/errors';

/** State returned to the admin forms. Never echoes a submitted password. */
export type AdminActionState = {
  ok: boolean;
  message: string | null;
  field?: string | null;
  temporaryPassword?: string | null;
};

function failure(err: unknown): AdminActionState {
  if (err instanceof AppError) return { ok: false, message: err.message, field: (err.details?.field as string) ?? null };
  console.error('[admin action]', err);
  return { ok: false, message: 'Something went wrong on the server. The error has been logged.' };
}

export async function createUserAction(_prev: AdminActionState, form: FormData): Promise<AdminActionState> {
  try {
    await assertSameOriginAction();
    // The DAL re-checks the role: anyone can POST to a server action.
    const actor = await requireUser();
    const { user, temporaryPassword } = await createUser(actor, {
      email: String(form.get('email') ?? ''),
      name: String(form.get('name') ?? ''),
      role: String(form.get('role') ?? '') as (typeof roles)[number],
      mode: form.get('mode') === 'invitation' ? 'invitation' : 'password',
      password: String(form.get('password') ?? '') || undefined,
    });
    revalidatePath('/admin');
    return {
      ok: true,
      message: temporaryPassword
        ? `Created ${user.email}. Give them this one-time password; they must change it at first sign-in.`
        : `Created ${user.email}.`,
      temporaryPassword,
    };
  } catch (err) {
    return failure(err);
  }
}

const idSchema = z.coerce.number().int().positive();

export async function changeRoleAction(_prev: AdminActionState, form: FormData): Promise<AdminActionState> {
  try {
    await assertSameOriginAction();
    const actor = await requireUser();
    const id = idSchema.parse(form.get('userId'));
    const role = z.enum(roles).parse(form.get('role'));
    const u = await changeRole(actor, id, role);
    revalidatePath('/admin');
    return { ok: true, message: `${u.email} is now ${u.role}.` };
  } catch (err) {
    return failure(err);
  }
}

export async function setActiveAction(_prev: AdminActionState, form: FormData): Promise<AdminActionState> {
  try {
    await assertSameOriginAction();
    const actor = await requireUser();
    const id = idSchema.parse(form.get('userId'));
    const active = form.get('active') === 'true';
    const u = await setUserActive(actor, id, active);
    revalidatePath('/admin');
    return { ok: true, message: `${u.email} is ${u.active ? 'active again' : 'deactivated'}.` };
  } catch (err) {
    return failure(err);
  }
}
