'use server';

import { z } from 'zod';
import { assertSameOriginAction } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { changeOwnPassword } from '@/lib/dal/users';
import { AppError } from '@/lib/errors';

export type PasswordState = { ok: boolean; message: string | null };

const schema = z
  .object({
    current: z.string({ message: 'Type your current password.' }).min(1, 'Type your current password.').max(200),
    password: z.string({ message: 'Type a new password.' }).min(10, 'A password needs at least 10 characters.').max(200, 'Keep the password under 200 characters.'),
    confirm: z.string({ message: 'Repeat the new password.' }),
  })
  .refine((v) => v.password === v.confirm, { message: 'The two new passwords differ: type the same password twice.', path: ['confirm'] });

export async function changePasswordAction(_prev: PasswordState, form: FormData): Promise<PasswordState> {
  try {
    await assertSameOriginAction();
    const actor = await requireUser();
    const parsed = schema.safeParse({ current: form.get('current'), password: form.get('password'), confirm: form.get('confirm') });
    if (!parsed.success) return { ok: false, message: parsed.error.issues[0]?.message ?? 'The password is not valid.' };
    await changeOwnPassword(actor, { currentPassword: parsed.data.current, newPassword: parsed.data.password });
    return { ok: true, message: 'Your password has been changed.' };
  } catch (err) {
    if (err instanceof AppError) return { ok: false, message: err.message };
    console.error('[account]', err);
    return { ok: false, message: 'Something went wrong on the server. The error has been logged.' };
  }
}
