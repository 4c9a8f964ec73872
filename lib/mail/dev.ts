/**
 * The local mail page (/dev/mail) shows every mail the SMTP fake received, reset and
 * verification links included: whoever can open it can take over any account. So it
 * exists only when both hold:
 *
 * 1. This is a local run nobody else can reach: the app server listens on a loopback
 *    address (127.0.0.1, ::1 — recorded by lib/server/app-server.ts after it binds;
 *    unknown means no), its public address (NEXTAUTH_URL) is a loopback host, and no
 *    proxy of the operator's forwards requests to it (PARTWISE_TRUST_PROXY unset).
 *    A server bound to 0.0.0.0, ::, or a public address never shows it, flag or not.
 * 2. The viewer may read other people's mail: staff, or everyone when the run opts in
 *    explicitly with PARTWISE_DEV_MAIL=1 (the test stack does).
 *
 * No server imports here, so the rule is unit-tested as a plain function.
 */
type Env = Record<string, string | undefined>;

const LISTEN_HOST_KEY = '__partwiseListenHost';

/** Called by the app server once it listens, with the address it actually bound. */
export function recordListenHost(address: string): void {
  (globalThis as Record<string, unknown>)[LISTEN_HOST_KEY] = address;
}

/** The address the app server bound, or null when not started through it (e.g. a bare `next dev`). */
export function listenHost(): string | null {
  const value = (globalThis as Record<string, unknown>)[LISTEN_HOST_KEY];
  return typeof value === 'string' ? value : null;
}

/** A loopback address or name: the whole 127.0.0.0/8 block, ::1, their IPv4-mapped form, localhost. */
export function isLoopbackHost(host: string | null | undefined): boolean {
  if (!host) return false;
  const h = host.trim().toLowerCase().replace(/^\[(.*)\]$/, '$1');
  if (h === 'localhost' || h === '::1' || h === '0:0:0:0:0:0:0:1') return true;
  const v4 = h.startsWith('::ffff:') ? h.slice(7) : h;
  const parts = v4.split('.');
  return parts.length === 4 && parts[0] === '127' && parts.every((p) => /^\d{1,3}$/.test(p) && Number(p) <= 255);
}

/** Why this run is not a reachable-only-from-here local run, or null when it is one. */
export function notLocalReason(env: Env, boundHost: string | null): string | null {
  if (!isLoopbackHost(boundHost)) return `the server listens on ${boundHost ?? 'an unknown address'}, not on loopback`;
  if (env.PARTWISE_TRUST_PROXY === '1') return 'a proxy forwards requests to this server (PARTWISE_TRUST_PROXY=1)';
  let publicHost: string | null = null;
  try {
    publicHost = env.NEXTAUTH_URL ? new URL(env.NEXTAUTH_URL).hostname : null;
  } catch {
    publicHost = null;
  }
  if (!isLoopbackHost(publicHost)) return `the public address (NEXTAUTH_URL) is ${env.NEXTAUTH_URL ?? 'not set'}, not a loopback address`;
  return null;
}

export function devMailOptedIn(env: Env): boolean {
  return env.PARTWISE_DEV_MAIL === '1';
}

/**
 * Whether this viewer may open the mail sink. `viewerIsStaff` is only asked when the
 * run is local and has not opted in for everyone (it reads the session).
 */
export async function devMailAllowed(opts: { viewerIsStaff: () => Promise<boolean>; env?: Env; boundHost?: string | null }): Promise<boolean> {
  const env = opts.env ?? process.env;
  const boundHost = opts.boundHost === undefined ? listenHost() : opts.boundHost;
  if (notLocalReason(env, boundHost) !== null) return false;
  if (devMailOptedIn(env)) return true;
  return opts.viewerIsStaff();
}

export function mailSinkDir(): string | null {
  return process.env.MAIL_SINK_DIR || null;
}
