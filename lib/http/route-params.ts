/**
 * The awaited `params` of dynamic route handlers and pages. An id that is not a positive whole
 * number answers like a missing resource (404 with the resource's own sentence), never a 400 that
 * would tell a prober which ids have the right shape.
 */
import { z } from 'zod';
import { AppError, type ErrorCode } from '@/lib/errors';

const idSchema = z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER);

/** The id named `key` in the route's params, or `AppError(notFound, message)`. */
export async function routeId<K extends string>(
  ctx: { params: Promise<Record<K, string>> },
  key: K,
  notFound: ErrorCode,
  message: string,
): Promise<number> {
  const p = idSchema.safeParse((await ctx.params)[key]);
  if (!p.success) throw new AppError(notFound, message);
  return p.data;
}

/** The dataset id of a route's params; an unusable id is a 404 like a missing dataset. */
export function datasetIdFrom(ctx: { params: Promise<{ id: string }> }): Promise<number> {
  return routeId(ctx, 'id', 'not_found:dataset', 'There is no such dataset.');
}

/** The upload report id of a route's params. */
export function reportIdFrom(ctx: { params: Promise<{ reportId: string }> }): Promise<number> {
  return routeId(ctx, 'reportId', 'not_found:report', 'There is no such upload report.');
}
