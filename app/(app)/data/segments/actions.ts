'use server';

import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import { assertSameOriginAction } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { updateSegment } from '@/lib/dal/segments';
import { AppError } from '@/lib/errors';

export type SegmentActionState = { ok: boolean; message: string | null; field?: string | null };

export async function updateSegmentAction(_prev: SegmentActionState, form: FormData): Promise<SegmentActionState> {
  try {
    await assertSameOriginAction();
    // The DAL re-checks the role: anyone can POST to a server action.
    const actor = await requireUser();
    const id = z.coerce.number().int().positive().parse(form.get('segmentId'));
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
    if (err instanceof AppError) return { ok: false, message: err.message, field: (err.details?.field as string) ?? null };
    console.error('[segment action]', err);
    return { ok: false, message: 'Something went wrong on the server. The error has been logged.' };
  }
}
