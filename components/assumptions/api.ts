import { AppError } from '@/lib/errors';

/** Sends JSON to the app's API and turns an error answer back into an AppError with its sentence. */
export async function apiSend<T>(method: 'POST' | 'PATCH' | 'DELETE', url: string, body?: unknown): Promise<T> {
  const res = await fetch(url, {
    method,
    headers: body === undefined ? undefined : { 'content-type': 'application/json' },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await res.text();
  const json = text ? (JSON.parse(text) as unknown) : null;
  if (!res.ok) throw AppError.fromJSON(json, res.status);
  return json as T;
}
