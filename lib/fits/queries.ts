import { queryOptions } from '@tanstack/react-query';
import { AppError } from '@/lib/errors';

/** What the progress island reads of GET /api/fits/:id (the results are rendered by the server page). */
export type FitStatusDto = {
  id: number;
  status: 'queued' | 'running' | 'succeeded' | 'failed' | 'cancelled';
  progress: number;
  message: string | null;
  error: string | null;
  mayCancel: boolean;
};

async function getJson<T>(url: string, init?: RequestInit): Promise<T> {
  const res = await fetch(url, { ...init, headers: { 'content-type': 'application/json', ...(init?.headers ?? {}) } });
  const body = await res.json().catch(() => null);
  if (!res.ok) throw AppError.fromJSON(body, res.status);
  return body as T;
}

export const TERMINAL = new Set(['succeeded', 'failed', 'cancelled']);

/** One factory for the fit resource: polled every second while the run is queued or running. */
export function fitQueryOptions(id: number) {
  return queryOptions({
    queryKey: ['fit', id],
    queryFn: () => getJson<FitStatusDto>(`/api/fits/${id}`),
    refetchInterval: (q) => (q.state.data && TERMINAL.has(q.state.data.status) ? false : 1000),
    staleTime: 0,
  });
}

export function postFit(body: unknown): Promise<{ id: number; status: 'queued' }> {
  return getJson('/api/fits', { method: 'POST', body: JSON.stringify(body) });
}

export function postCancelFit(id: number): Promise<unknown> {
  return getJson(`/api/fits/${id}/cancel`, { method: 'POST' });
}
