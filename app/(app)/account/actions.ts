'use server';

import { z } from 'zod';
import { requireUser } from '@/lib/auth/session';
import { changeOwnPassword } from '@/lib/dal/users';
import { AppError } from '@/lib/errors';

export type PasswordState = { ok: boolean; message: string | null };

const schema = z
  .object({ password: z.string().min(10, 'A password needs at least 10 characters.').max(200), confirm: z.string() })
  .refine((v) => v.password === v.confirm, { message: 'The two passwords differ.', path: ['confirm'] });

export async function changePasswordAction(_prev: PasswordState, form: FormData): Promise<PasswordState> {
  try {
    const actor = await requireUser();
    const parsed = schema.safeParse({ password: form.get('password'), confirm: form.get('confirm') });
    if (!parsed.success) return { ok: false, message: parsed.error.issues[0]?.message ?? 'The password is not valid.' };
    await changeOwnPassword(actor, parsed.data.password);
    return { ok: true, message: 'Your password has been changed.' };
  } catch (err) {
    if (err instanceof AppError) return { ok: false, message: err.message };
    console.error('[account]', err);
    return { ok: false, message: 'Something went wrong on the server. The error has been logged.' };
  }
}
