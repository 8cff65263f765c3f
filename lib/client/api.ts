import { AppError } from '@/lib/errors';

/**
 * The browser's one way to call the app's API (client islands; TanStack Query's queryFn and
 * mutationFn call these). JSON in and out; an error answer becomes the same AppError the server
 * threw (code, sentence and details such as an upload's findings), a lost connection an AppError
 * with a sentence, never a bare TypeError. The file upload alone goes through XMLHttpRequest, for
 * its progress (lib/client/datasets.ts).
 */

type Method = 'GET' | 'POST' | 'PATCH' | 'DELETE';

async function call<T>(method: Method, url: string, body?: unknown): Promise<T> {
  let res: Response;
  try {
    res = await fetch(url, {
      method,
      headers: { Accept: 'application/json', ...(method === 'GET' ? {} : { 'Content-Type': 'application/json' }) },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
  } catch {
    throw new AppError('unavailable:network', 'The server could not be reached. Check the connection and try again.');
  }
  if (res.status === 204) return undefined as T;
  const text = await res.text();
  let json: unknown = null;
  try {
    json = text ? JSON.parse(text) : null;
  } catch {
    // Not JSON (a proxy's error page, say): answered below as an unexpected answer.
  }
  if (!res.ok || (text && json === null)) throw AppError.fromJSON(json, res.ok ? 502 : res.status);
  return json as T;
}

/** GET a JSON resource of the API. */
export function apiGet<T>(url: string): Promise<T> {
  return call<T>('GET', url);
}

/** Sends JSON (or nothing) to the API and returns its JSON answer (undefined for 204). */
export function apiSend<T = unknown>(method: 'POST' | 'PATCH' | 'DELETE', url: string, body?: unknown): Promise<T> {
  return call<T>(method, url, body);
}
