/**
 * The `next` parameter of sign-in links, accepted only when it is a path on this site
 * (no scheme, no `//host`), so a crafted link cannot send people elsewhere after signing in.
 */
export function safeNext(raw: string | null | undefined, fallback = '/'): string {
  if (!raw) return fallback;
  if (!raw.startsWith('/') || raw.startsWith('//') || raw.startsWith('/\\')) return fallback;
  return raw;
}

export function withNext(path: string, next: string | null | undefined): string {
  return next ? `${path}?next=${encodeURIComponent(next)}` : path;
}
