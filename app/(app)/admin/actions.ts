'use server';

import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import { roles } from '@/db/schema';
import type { AdminActionState } from '@/components/admin/action-state';
import { assertSameOriginAction } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { changeRole, createUser, setUserActive } from '@/lib/dal/users';
import { failureState, parseOrThrow } from '@/lib/errors';

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
    return failureState(err);
  }
}

const idSchema = z.coerce.number({ message: 'Choose a user.' }).int('Choose a user.').positive('Choose a user.');
const roleSchema = z.enum(roles, { message: 'Choose a role: viewer, analyst, validator or admin.' });

export async function changeRoleAction(_prev: AdminActionState, form: FormData): Promise<AdminActionState> {
  try {
    await assertSameOriginAction();
    const actor = await requireUser();
    const id = parseOrThrow(idSchema, form.get('userId'), 'invalid:user');
    const role = parseOrThrow(roleSchema, form.get('role'), 'invalid:role');
    const u = await changeRole(actor, id, role);
    revalidatePath('/admin');
    return { ok: true, message: `${u.email} is now ${u.role}.` };
  } catch (err) {
    return failureState(err);
  }
}

export async function setActiveAction(_prev: AdminActionState, form: FormData): Promise<AdminActionState> {
  try {
    await assertSameOriginAction();
    const actor = await requireUser();
    const id = parseOrThrow(idSchema, form.get('userId'), 'invalid:user');
    const active = form.get('active') === 'true';
    const u = await setUserActive(actor, id, active);
    revalidatePath('/admin');
    return { ok: true, message: `${u.email} is ${u.active ? 'active again' : 'deactivated'}.` };
  } catch (err) {
    return failureState(err);
  }
}
