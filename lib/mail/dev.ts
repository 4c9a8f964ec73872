/**
 * The local mail page (/dev/mail) exists only off production, or in local runs of
 * the production build (`npm start` without NEXTAUTH_SECRET sets PARTWISE_LOCAL=1;
 * the test stack sets PARTWISE_DEV_MAIL=1). A real deployment has neither.
 */
export function devMailEnabled(): boolean {
  return process.env.NODE_ENV !== 'production' || process.env.PARTWISE_LOCAL === '1' || process.env.PARTWISE_DEV_MAIL === '1';
}

export function mailSinkDir(): string | null {
  return process.env.MAIL_SINK_DIR || null;
}
