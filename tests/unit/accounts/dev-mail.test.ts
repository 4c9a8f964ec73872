import { describe, expect, it } from 'vitest';
import { devMailAllowed, isLoopbackHost, notLocalReason } from '@/lib/mail/dev';

/** The /dev/mail rule: loopback-only local runs, then staff or the explicit PARTWISE_DEV_MAIL=1. */
const LOCAL_URL = 'http://localhost:3000';
const staff = async () => true;
const visitor = async () => false;

describe('isLoopbackHost', () => {
  it.each(['127.0.0.1', 'localhost', 'LOCALHOST', '::1', '[::1]', '::ffff:127.0.0.1', '127.0.1.1'])('%s is loopback', (host) => {
    expect(isLoopbackHost(host)).toBe(true);
  });
  it.each(['0.0.0.0', '::', '[::]', '192.168.1.20', '10.0.0.5', '203.0.113.9', 'partwise.example.com', 'localhost.evil.example', '127.0.0.1.evil.example', '1270.0.0.1', '', null, undefined])(
    '%s is not loopback',
    (host) => {
      expect(isLoopbackHost(host)).toBe(false);
    },
  );
});

describe('devMailAllowed', () => {
  it('opens for everyone on a loopback run that opted in (the test stack)', async () => {
    expect(await devMailAllowed({ env: { PARTWISE_DEV_MAIL: '1', NEXTAUTH_URL: LOCAL_URL }, boundHost: '127.0.0.1', viewerIsStaff: visitor })).toBe(true);
    expect(await devMailAllowed({ env: { PARTWISE_DEV_MAIL: '1', NEXTAUTH_URL: 'http://[::1]:3000' }, boundHost: '::1', viewerIsStaff: visitor })).toBe(true);
  });

  it('without the flag, a loopback run shows it to staff only', async () => {
    const env = { NEXTAUTH_URL: LOCAL_URL, PARTWISE_LOCAL: '1' };
    expect(await devMailAllowed({ env, boundHost: '127.0.0.1', viewerIsStaff: visitor })).toBe(false);
    expect(await devMailAllowed({ env, boundHost: '127.0.0.1', viewerIsStaff: staff })).toBe(true);
    expect(await devMailAllowed({ env: { ...env, PARTWISE_DEV_MAIL: 'yes' }, boundHost: '127.0.0.1', viewerIsStaff: visitor })).toBe(false);
  });

  it.each([
    ['bound to all IPv4 interfaces', '0.0.0.0', {}],
    ['bound to all IPv6 interfaces', '::', {}],
    ['bound to a LAN address', '192.168.1.20', {}],
    ['bound to a public address', '203.0.113.9', {}],
    ['bound address unknown (not started by the app server)', null, {}],
    ['behind a proxy that forwards to loopback', '127.0.0.1', { PARTWISE_TRUST_PROXY: '1' }],
    ['with a public NEXTAUTH_URL', '127.0.0.1', { NEXTAUTH_URL: 'https://partwise.example.com' }],
    ['with a LAN NEXTAUTH_URL', '127.0.0.1', { NEXTAUTH_URL: 'http://192.168.1.20:3000' }],
    ['without NEXTAUTH_URL', '127.0.0.1', { NEXTAUTH_URL: undefined }],
    ['with a broken NEXTAUTH_URL', '127.0.0.1', { NEXTAUTH_URL: 'not a url' }],
  ])('is never available %s, even with the flag and for staff', async (_label, boundHost, extra) => {
    const env = { PARTWISE_DEV_MAIL: '1', PARTWISE_LOCAL: '1', NEXTAUTH_URL: LOCAL_URL, ...extra };
    let asked = false;
    const viewerIsStaff = async () => {
      asked = true;
      return true;
    };
    expect(await devMailAllowed({ env, boundHost, viewerIsStaff })).toBe(false);
    expect(notLocalReason(env, boundHost)).toEqual(expect.any(String));
    // The session is not even read when the run is not local.
    expect(asked).toBe(false);
  });
});
