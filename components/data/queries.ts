import { queryOptions } from '@tanstack/react-query';
import type { DatasetDto, ReportDto } from '@/lib/dal/datasets';
import { AppError } from '@/lib/errors';

/** GET a JSON resource of the API; an error answer becomes the same AppError the server threw. */
export async function fetchJson<T>(url: string, init?: RequestInit): Promise<T> {
  const res = await fetch(url, { ...init, headers: { Accept: 'application/json', ...(init?.headers ?? {}) } });
  const body = await res.json().catch(() => null);
  if (!res.ok) throw AppError.fromJSON(body, res.status);
  return body as T;
}

/** The datasets list; refreshed every 2 s while a loan tape is being converted. */
export function datasetsQuery(initial?: DatasetDto[]) {
  return queryOptions({
    queryKey: ['datasets'],
    queryFn: async () => (await fetchJson<{ datasets: DatasetDto[] }>('/api/datasets')).datasets,
    initialData: initial,
    // The list changes with every upload, and a client-side navigation back to /data would
    // otherwise show the list cached on an earlier visit (found in QA).
    staleTime: 0,
    refetchOnMount: 'always',
    refetchInterval: (q) => (q.state.data?.some((d) => d.status === 'processing') ? 2000 : false),
  });
}

/** One upload report (with its conversion job), polled while processing. */
export function uploadReportQuery(reportId: number) {
  return queryOptions({
    queryKey: ['upload-report', reportId],
    queryFn: async () => (await fetchJson<{ report: ReportDto }>(`/api/datasets/reports/${reportId}`)).report,
    refetchInterval: (q) => (q.state.data?.status === 'processing' || !q.state.data ? 1000 : false),
  });
}
