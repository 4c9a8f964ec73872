/** Only same-site paths may be a post-sign-in destination (no open redirects). */
export function safeReturnPath(value: string | null | undefined, fallback = '/studio'): string {
  if (!value || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return fallback;
  return value;
}
