'use server';

import { redirect } from 'next/navigation';
import { z } from 'zod';
import type { FormState } from '@/components/form-state';
import { assertSameOriginAction } from '@/lib/auth/same-origin';
import { requireSignedIn } from '@/lib/auth/session';
import { changeOwnPassword } from '@/lib/dal/users';
import { failureState, parseOrThrow } from '@/lib/errors';

const schema = z
  .object({
    current: z.string({ message: 'Type your current password.' }).min(1, 'Type your current password.').max(200),
    password: z.string({ message: 'Type a new password.' }).min(10, 'A password needs at least 10 characters.').max(200, 'Keep the password under 200 characters.'),
    confirm: z.string({ message: 'Repeat the new password.' }),
  })
  .refine((v) => v.password === v.confirm, { message: 'The two new passwords differ: type the same password twice.', path: ['confirm'] });

export async function changePasswordAction(_prev: FormState, form: FormData): Promise<FormState> {
  try {
    await assertSameOriginAction();
    // Allowed while a one-time password is still to be replaced: this is how it is replaced.
    const actor = await requireSignedIn();
    const v = parseOrThrow(schema, { current: form.get('current'), password: form.get('password'), confirm: form.get('confirm') }, 'invalid:password', 'The password is not valid.');
    await changeOwnPassword(actor, { currentPassword: v.current, newPassword: v.password });
  } catch (err) {
    return failureState(err);
  }
  // The change ended every session of the account, this one too: sign in again with the new password.
  redirect('/sign-in?changed=1');
}
