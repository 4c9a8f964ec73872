import { describe, expect, it } from 'vitest';
import { isHelloMessage, isSizeMessage, MESSAGE_SOURCE } from '@/embed/protocol';
import { callerOrigin, checkOrigin, frameAncestors } from '@/lib/embeds/origins';
import { calculatorPolicy } from '@/lib/embeds/frame-policy';
import { canonicalJson } from '@/lib/embeds/payload';

describe('origin entries', () => {
  it.each([
    ['https://club.example', 'https://club.example'],
    ['HTTPS://Club.Example:443/', 'https://club.example'],
    ['http://localhost:4000', 'http://localhost:4000'],
    ['https://club.example:8443', 'https://club.example:8443'],
    ['  https://xn--bcher-kva.example  ', 'https://xn--bcher-kva.example'],
  ])('%s → %s', (input, origin) => {
    expect(checkOrigin(input)).toEqual({ ok: true, origin });
  });

  it.each([
    ['https://club.example/rides/join?x=1', 'https://club.example'],
    ['https://club.example?x=1', 'https://club.example'],
    ['https://Club.Example:8443/page#top', 'https://club.example:8443'],
  ])('keeps only the origin of the page address %s', (input, origin) => {
    expect(checkOrigin(input)).toEqual({ ok: true, origin, trimmed: true });
  });

  it.each([
    ['', /empty/],
    ['club.example', /start with https/],
    ['ftp://club.example', /start with https/],
    ['https://*.club.example', /wildcard/],
    ['https://user:pw@club.example', /user name/],
    ["https://club.example 'unsafe-inline'", /spaces, quotes/],
    ['https://club.example;script-src', /semicolons/],
  ])('refuses %j', (input, reason) => {
    const r = checkOrigin(input);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(reason);
  });

  it("builds frame-ancestors with 'self' first and drops anything that is not an origin", () => {
    expect(frameAncestors(['https://a.example', 'bogus; script-src *'])).toBe("frame-ancestors 'self' https://a.example");
    const policy = calculatorPolicy(['https://a.example']);
    expect(policy).toMatch(/^frame-ancestors 'self' https:\/\/a\.example; default-src 'self'; /);
    // The rest is the app's own policy (the test process is not production, so eval is allowed here only).
    for (const d of ["object-src 'none'", "base-uri 'self'", "connect-src 'self'", "form-action 'self'"]) expect(policy).toContain(d);
    expect(policy.match(/frame-ancestors/g)).toHaveLength(1);
  });

  it('reads the caller from Origin, else Referer', () => {
    expect(callerOrigin(new Headers({ origin: 'https://a.example' }))).toBe('https://a.example');
    expect(callerOrigin(new Headers({ referer: 'https://a.example/page?x' }))).toBe('https://a.example');
    expect(callerOrigin(new Headers({ origin: 'null' }))).toBe('null');
    expect(callerOrigin(new Headers())).toBeNull();
  });
});

describe('iframe messages', () => {
  const size = { source: MESSAGE_SOURCE, type: 'size', token: 'abcdefghijklmnopqrstuvwx', height: 640 };
  it('accepts exactly the size and hello shapes', () => {
    expect(isSizeMessage(size)).toBe(true);
    expect(isHelloMessage({ source: MESSAGE_SOURCE, type: 'hello' })).toBe(true);
  });
  it.each([
    ['extra key', { ...size, extra: 1 }],
    ['other source', { ...size, source: 'someone-else' }],
    ['string height', { ...size, height: '640' }],
    ['NaN height', { ...size, height: Number.NaN }],
    ['negative height', { ...size, height: -5 }],
    ['short token', { ...size, token: 'abc' }],
    ['not an object', 'size 640'],
  ])('refuses a size message with %s', (_, message) => {
    expect(isSizeMessage(message)).toBe(false);
  });
});

it('canonical JSON sorts keys at every level', () => {
  expect(canonicalJson({ b: 1, a: { d: [{ y: 1, x: 2 }], c: null } })).toBe('{"a":{"c":null,"d":[{"x":2,"y":1}]},"b":1}');
});
