/**
 * Next.js calls register() once when a server process starts. Fit jobs that a previous
 * process left running can never finish, so they are failed with a reason here, and
 * queued ones are picked up. Background timers (spike sweep, mail retry) start here too.
 */
export async function register() {
  if (process.env.NEXT_RUNTIME === 'nodejs') {
    const { recoverInterruptedFits } = await import('@/lib/fitting/jobs');
    try {
      await recoverInterruptedFits();
    } catch (e) {
      // A database that is not migrated yet must not stop the server from answering /api/health.
      console.error('[partwise] could not check for interrupted fit jobs:', (e as Error).message);
    }
    (await import('@/lib/support/timers')).startSupportTimers();
    // Mail queued while the SMTP server was down goes out without waiting for a request.
    (await import('@/lib/mail')).ensureMailRetryTimer();
  }
}
