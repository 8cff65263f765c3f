import { z } from 'zod';
import { AppError } from '@/lib/errors';

const idSchema = z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER);

/** The dataset id of a route's awaited params; an unusable id is a 404 like a missing dataset. */
export async function datasetIdFrom(ctx: { params: Promise<{ id: string }> }): Promise<number> {
  const p = idSchema.safeParse((await ctx.params).id);
  if (!p.success) throw new AppError('not_found:dataset', 'There is no such dataset.');
  return p.data;
}

export async function reportIdFrom(ctx: { params: Promise<{ reportId: string }> }): Promise<number> {
  const p = idSchema.safeParse((await ctx.params).reportId);
  if (!p.success) throw new AppError('not_found:report', 'There is no such upload report.');
  return p.data;
}

/** A download name without characters that break a Content-Disposition header. */
export function safeDownloadName(name: string): string {
  return name.replace(/[^A-Za-z0-9._-]+/g, '_').slice(0, 120) || 'download';
}
