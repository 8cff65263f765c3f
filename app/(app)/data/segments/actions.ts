'use server';

import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import { assertSameOriginAction } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { updateSegment } from '@/lib/dal/segments';
import type { FormState } from '@/components/form-state';
import { failureState, parseOrThrow } from '@/lib/errors';

const segmentIdSchema = z.coerce.number({ message: 'Choose a segment.' }).int('Choose a segment.').positive('Choose a segment.');

export async function updateSegmentAction(_prev: FormState, form: FormData): Promise<FormState> {
  try {
    await assertSameOriginAction();
    // The DAL re-checks the role: anyone can POST to a server action.
    const actor = await requireUser();
    const id = parseOrThrow(segmentIdSchema, form.get('segmentId'), 'invalid:segment');
    const s = await updateSegment(actor, id, {
      assetClass: String(form.get('assetClass') ?? '') as never,
      turnoverEurMillions: String(form.get('turnoverEurMillions') ?? ''),
      description: String(form.get('description') ?? ''),
      ownerId: String(form.get('ownerId') ?? ''),
    });
    revalidatePath('/data');
    revalidatePath(`/data/segments/${id}`);
    return { ok: true, message: `Saved the settings of ${s.name}.` };
  } catch (err) {
    return failureState(err);
  }
}
