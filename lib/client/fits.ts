import { queryOptions } from '@tanstack/react-query';
import type { FitDto } from '@/lib/dal/fits';
import { apiGet, apiSend } from './api';

/** The fits resource in the browser: its queries (shared by the pages' prefetch and the islands' hooks) and its calls. */

/** What the progress island reads of GET /api/fits/:id (the results are rendered by the server page). */
export type FitStatusDto = Pick<FitDto, 'id' | 'status' | 'progress' | 'message' | 'error' | 'mayCancel'>;

/** Statuses after which a run changes no more. */
export const TERMINAL: ReadonlySet<FitStatusDto['status']> = new Set(['succeeded', 'failed', 'cancelled']);

/** A fit run's status, polled every second while it is queued or running. */
export function fitStatusQuery(id: number) {
  return queryOptions({
    queryKey: ['fit', id],
    queryFn: () => apiGet<FitStatusDto>(`/api/fits/${id}`),
    refetchInterval: (q) => (q.state.data && TERMINAL.has(q.state.data.status) ? false : 1000),
    staleTime: 0,
  });
}

export function requestFit(body: unknown): Promise<{ id: number; status: 'queued' }> {
  return apiSend('POST', '/api/fits', body);
}

export function cancelFit(id: number): Promise<unknown> {
  return apiSend('POST', `/api/fits/${id}/cancel`);
}
