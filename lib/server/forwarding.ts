import type { IncomingMessage } from 'node:http';

/**
 * Who the client is. Forwarded headers (X-Forwarded-For/-Proto/-Host, X-Real-IP) are
 * only believed when the operator says a proxy of theirs sets them
 * (PARTWISE_TRUST_PROXY=1). Otherwise any a client sent are dropped and
 * X-Forwarded-For is set to the socket's address, so rate limits and audit entries
 * everywhere (which read that header) cannot be dodged by sending a made-up one.
 */
export interface ClientView {
  address: string | null;
  proto: 'http' | 'https';
  host: string | null;
}

export function trustsProxy(): boolean {
  return process.env.PARTWISE_TRUST_PROXY === '1';
}

const FORWARDING_HEADERS = ['x-forwarded-for', 'x-forwarded-proto', 'x-forwarded-host', 'x-forwarded-port', 'x-real-ip', 'forwarded'];

function first(v: string | string[] | undefined): string | undefined {
  const s = Array.isArray(v) ? v[0] : v;
  return s?.split(',')[0]?.trim() || undefined;
}

/** Decide the client's view of the request, and make the headers Next sees say exactly that. */
export function settleForwarding(req: IncomingMessage, trustProxy = trustsProxy()): ClientView {
  const socketAddress = req.socket.remoteAddress ?? null;
  if (trustProxy) {
    const proto = first(req.headers['x-forwarded-proto']) === 'https' ? 'https' : 'http';
    return { address: first(req.headers['x-forwarded-for'])?.slice(0, 64) ?? socketAddress, proto, host: first(req.headers['x-forwarded-host']) ?? req.headers.host ?? null };
  }
  const headers = req.headers;
  for (const name of FORWARDING_HEADERS) if (headers[name] !== undefined) delete headers[name];
  if (socketAddress) req.headers['x-forwarded-for'] = socketAddress;
  return { address: socketAddress, proto: 'http', host: req.headers.host ?? null };
}

export function requestOrigin(req: IncomingMessage, client: ClientView): string {
  return `${client.proto}://${client.host ?? req.headers.host ?? 'localhost'}`;
}
