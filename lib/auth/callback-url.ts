/**
 * Where a person goes after signing in: only a path of this application. `callbackUrl` comes from
 * the query string, so it is attacker-controlled; browsers read `/\host`, `/<tab>/host` and `//host`
 * as another host (the WHATWG URL standard treats `\` like `/` and drops tabs and line breaks), and
 * a path can hide such a shape behind percent-encoding or dot segments (`/.//host`). The rule:
 *
 * - the text must be a path (start with one `/`) with no backslash and no control character, also
 *   after percent-decoding it (up to three times: the value may pass through more decoders);
 * - parsed as a URL against a placeholder origin, it must keep that origin, and its normalised path
 *   must not start with `//`;
 * - the answer is the normalised path, query and fragment; anything else is `/`.
 */
const PLACEHOLDER = 'http://rhobook.invalid';

function hasForbiddenCharacters(text: string): boolean {
  // Backslash, C0 controls (tab, CR, LF among them), DEL, and the C1 controls.
  return /[\\\u0000-\u001f\u007f-\u009f]/.test(text);
}

function decodedForms(text: string): string[] {
  const forms = [text];
  let current = text;
  for (let i = 0; i < 3; i++) {
    let next: string;
    try {
      next = decodeURIComponent(current);
    } catch {
      return [...forms, '\\']; // undecodable: treat as unsafe
    }
    if (next === current) break;
    forms.push(next);
    current = next;
  }
  return forms;
}

export function safeCallbackPath(raw: unknown): string {
  const value = Array.isArray(raw) ? raw[0] : raw;
  if (typeof value !== 'string' || value.length === 0 || value.length > 2000) return '/';
  for (const form of decodedForms(value)) {
    if (!form.startsWith('/') || form.startsWith('//') || hasForbiddenCharacters(form)) return '/';
  }
  let url: URL;
  try {
    url = new URL(value, PLACEHOLDER);
  } catch {
    return '/';
  }
  if (url.origin !== PLACEHOLDER || url.pathname.startsWith('//')) return '/';
  for (const form of decodedForms(url.pathname)) {
    if (form.startsWith('//') || hasForbiddenCharacters(form)) return '/';
  }
  return `${url.pathname}${url.search}${url.hash}`;
}

/**
 * next-auth's redirect rule with the same policy: a path or a URL of this application (`baseUrl`)
 * is kept as an absolute URL on that origin; anything else goes to the home page.
 */
export function safeRedirectUrl(url: string, baseUrl: string): string {
  const base = baseUrl.replace(/\/$/, '');
  let path = url;
  if (!url.startsWith('/')) {
    try {
      const u = new URL(url);
      if (u.origin !== new URL(base).origin) return `${base}/`;
      path = `${u.pathname}${u.search}${u.hash}`;
    } catch {
      return `${base}/`;
    }
  }
  return `${base}${safeCallbackPath(path)}`;
}
