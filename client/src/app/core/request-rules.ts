/**
 * Which requests the HTTP interceptor touches. Pure functions (unit-tested under mocha).
 */

/** Header the server checks on every state-changing request under /api. */
export const CSRF_HEADER = 'X-CSRF-Token';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * The path of a request to our own API (`/api/...`), or null for anything else. Relative URLs are
 * ours; an absolute URL is ours only when its origin equals `origin` (the page's own).
 */
export function apiPath(url: string, origin?: string): string | null {
  let path = url;
  if (/^[a-z][a-z0-9+.-]*:/i.test(url) || url.startsWith('//')) {
    if (!origin) return null;
    try {
      const parsed = new URL(url, origin);
      if (parsed.origin !== origin) return null;
      path = parsed.pathname;
    } catch {
      return null;
    }
  }
  path = path.split(/[?#]/, 1)[0] ?? '';
  return path === '/api' || path.startsWith('/api/') ? path : null;
}

/** True when a request must carry the CSRF token: a state-changing method to our API. */
export function needsCsrfToken(method: string, url: string, origin?: string): boolean {
  return !SAFE_METHODS.has(method.toUpperCase()) && apiPath(url, origin) !== null;
}

/**
 * True for the sign-in/up/out and session endpoints: they answer 401 as part of their job (a wrong
 * password), so a 401 from them does not mean "your session has ended".
 */
export function isAuthRequest(url: string, origin?: string): boolean {
  const path = apiPath(url, origin);
  return path !== null && (path === '/api/auth' || path.startsWith('/api/auth/'));
}

/**
 * A return URL from the query string, accepted only when it is a path inside this app, so that a
 * crafted sign-in link cannot send the user to another site after signing in.
 */
export function safeReturnUrl(value: string | null | undefined): string {
  if (!value || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return '/';
  if (/[\u0000-\u001f\\]/.test(value)) return '/';
  if (/^\/sign-(in|up)(?=$|[/?#])/.test(value)) return '/';
  return value;
}
