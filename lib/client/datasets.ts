import { queryOptions } from '@tanstack/react-query';
import type { DatasetDto, ReportDto } from '@/lib/dal/datasets';
import { apiGet, apiSend } from './api';

/** The datasets resource in the browser: its queries (shared by the pages' prefetch and the islands' hooks) and its calls. */

/** The datasets list; refreshed every 2 s while a loan tape is being converted. */
export function datasetsQuery() {
  return queryOptions({
    queryKey: ['datasets'],
    queryFn: async () => (await apiGet<{ datasets: DatasetDto[] }>('/api/datasets')).datasets,
    // The list changes with every upload: read it again whenever the table mounts.
    staleTime: 0,
    refetchOnMount: 'always',
    refetchInterval: (q) => (q.state.data?.some((d) => d.status === 'processing') ? 2000 : false),
  });
}

/** One upload report (with its conversion job), polled while processing. */
export function uploadReportQuery(reportId: number) {
  return queryOptions({
    queryKey: ['upload-report', reportId],
    queryFn: async () => (await apiGet<{ report: ReportDto }>(`/api/datasets/reports/${reportId}`)).report,
    refetchInterval: (q) => (q.state.data?.status === 'processing' || !q.state.data ? 1000 : false),
  });
}

export function supersedeDataset(id: number, by: number): Promise<{ dataset: DatasetDto }> {
  return apiSend('POST', `/api/datasets/${id}/supersede`, { by });
}

export function deleteDataset(id: number): Promise<void> {
  return apiSend('DELETE', `/api/datasets/${id}`);
}

export function waiveWarnings(id: number, waiver: { rule: string; reason: string }): Promise<unknown> {
  return apiSend('POST', `/api/datasets/${id}/waivers`, waiver);
}

/**
 * Sends an upload form (multipart) with XMLHttpRequest, which reports upload progress (fetch does
 * not). Answers the status and the JSON body; the form turns them into what it shows.
 */
export function uploadDatasetFile(form: FormData, onProgress: (fraction: number) => void): Promise<{ status: number; body: Record<string, unknown> }> {
  return new Promise((resolve) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', '/api/datasets');
    xhr.responseType = 'json';
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(e.loaded / e.total);
    };
    xhr.onload = () => resolve({ status: xhr.status, body: (xhr.response as Record<string, unknown>) ?? {} });
    xhr.onerror = () => resolve({ status: 0, body: { message: 'The upload failed: the connection to the server was lost. Try again.' } });
    xhr.send(form);
  });
}
