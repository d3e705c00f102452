/**
 * Where to go after signing in: only a path on this site ("/student/practicals/3"), never another
 * host ("//evil.example", "/\\evil.example", "https://…"), so the sign-in page cannot be used to
 * send people elsewhere. Returns the path, or null.
 */
export function safeNextPath(raw: string | null | undefined): string | null {
  if (!raw || raw.length > 500) return null;
  if (!raw.startsWith('/') || raw.startsWith('//') || raw.includes('\\')) return null;
  // eslint-disable-next-line no-control-regex -- refusing control characters is the point of this pattern
  if (/[\u0000-\u001f\u007f]/.test(raw)) return null;
  if (/^\/(signin|api\/auth)(\/|\?|$)/.test(raw)) return null;
  return raw;
}
