import { count } from 'drizzle-orm';
import { getDb } from '@/db/connection';
import { cohortRows, datasetFiles, datasets, uploadReports } from '@/db/schema';

/** Rows in the dataset tables, to prove what an upload wrote or did not write. */
export async function tableCounts(): Promise<{ datasets: number; cohortRows: number; files: number; reports: number }> {
  const db = getDb();
  const [[d], [c], [f], [r]] = await Promise.all([
    db.select({ n: count() }).from(datasets),
    db.select({ n: count() }).from(cohortRows),
    db.select({ n: count() }).from(datasetFiles),
    db.select({ n: count() }).from(uploadReports),
  ]);
  return { datasets: d.n, cohortRows: c.n, files: f.n, reports: r.n };
}

/** A multipart upload request as a browser or a script would send it to POST /api/datasets. */
export function uploadRequest(
  fields: Record<string, string>,
  content: string | Uint8Array | null,
  fileName = 'data.csv',
  headers: Record<string, string> = {},
): Request {
  const fd = new FormData();
  for (const [k, v] of Object.entries(fields)) fd.append(k, v);
  if (content !== null) fd.append('file', new Blob([content as BlobPart], { type: 'text/csv' }), fileName);
  const req = new Request('http://127.0.0.1/api/datasets', { method: 'POST', body: fd });
  if (Object.keys(headers).length === 0) return req;
  const h = new Headers(req.headers);
  for (const [k, v] of Object.entries(headers)) h.set(k, v);
  return new Request('http://127.0.0.1/api/datasets', { method: 'POST', body: req.body, headers: h, duplex: 'half' } as RequestInit);
}

/** Context object for a dynamic route handler ({ params: Promise }). */
export function paramsOf<T extends Record<string, string>>(p: T): { params: Promise<T> } {
  return { params: Promise.resolve(p) };
}
