/**
 * The local run's session secret (lib/auth/local-secret.ts, lib/auth/secret.ts): made
 * once with random bytes, owner-only from the first byte on disk, kept across restarts,
 * replaced when others could read it or it is damaged, refused when it is a symlink;
 * and no secret derived from public values (the old sha256 of the database path) is
 * ever used.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createHash } from 'node:crypto';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { LocalSecretError, ensureLocalSecret, localSecretPath, readLocalSecret } from '@/lib/auth/local-secret';
import { authSecret } from '@/lib/auth/secret';

let dir: string;
const saved = { ...process.env };
beforeEach(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'partwise-secret-'));
});
afterEach(() => {
  fs.rmSync(dir, { recursive: true, force: true });
  for (const k of ['NEXTAUTH_SECRET', 'AUTH_SECRET', 'PARTWISE_LOCAL', 'PARTWISE_DATA_DIR', 'DATABASE_URL', 'NEXT_PHASE', 'NODE_ENV']) {
    if (saved[k] === undefined) delete process.env[k];
    else (process.env as Record<string, string | undefined>)[k] = saved[k];
  }
});

const mode = (file: string) => fs.statSync(file).mode & 0o777;

describe('the local session secret file', () => {
  it('is made once, random, owner-only (even with a permissive umask), and kept across restarts', () => {
    const file = path.join(dir, 'session-secret');
    let previous: number | undefined;
    try {
      previous = process.umask(0o000);
    } catch {
      previous = undefined; // worker threads cannot change the umask; 0600 at creation is still checked
    }
    let first;
    try {
      first = ensureLocalSecret(file);
    } finally {
      if (previous !== undefined) process.umask(previous);
    }
    expect(first.action).toBe('created');
    expect(mode(file)).toBe(0o600);
    expect(first.secret.length).toBeGreaterThanOrEqual(32);
    expect(first.secret).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(ensureLocalSecret(file)).toEqual({ secret: first.secret, action: 'kept' });
    expect(readLocalSecret(file)).toBe(first.secret);
    const other = ensureLocalSecret(path.join(dir, 'other', 'session-secret'));
    expect(other.secret).not.toBe(first.secret);
    expect(fs.readdirSync(dir).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  });

  it('is refused when others could read it, and replaced with a new owner-only one at start', () => {
    const file = path.join(dir, 'session-secret');
    const { secret } = ensureLocalSecret(file);
    fs.chmodSync(file, 0o644);
    expect(() => readLocalSecret(file)).toThrow(LocalSecretError);
    expect(() => readLocalSecret(file)).toThrow(/readable by others \(mode 644\)/);
    const repaired = ensureLocalSecret(file);
    expect(repaired.action).toBe('replaced');
    expect(repaired.reason).toMatch(/readable by others/);
    expect(repaired.secret).not.toBe(secret);
    expect(mode(file)).toBe(0o600);
    fs.chmodSync(file, 0o640);
    expect(() => readLocalSecret(file)).toThrow(/mode 640/);
  });

  it('is replaced when empty or too short, and refused when it is a symbolic link', () => {
    const file = path.join(dir, 'session-secret');
    fs.writeFileSync(file, 'short\n', { mode: 0o600 });
    expect(() => readLocalSecret(file)).toThrow(/too short \(5 characters\)/);
    expect(ensureLocalSecret(file).action).toBe('replaced');

    const target = path.join(dir, 'elsewhere');
    fs.writeFileSync(target, 'x'.repeat(64), { mode: 0o600 });
    const link = path.join(dir, 'linked', 'session-secret');
    fs.mkdirSync(path.dirname(link));
    fs.symlinkSync(target, link);
    expect(() => readLocalSecret(link)).toThrow(/symbolic link/);
    expect(() => ensureLocalSecret(link)).toThrow(/symbolic link/);
    expect(fs.readFileSync(target, 'utf8')).toBe('x'.repeat(64));
  });

  it('lives in PARTWISE_DATA_DIR (default data/)', () => {
    expect(localSecretPath({ PARTWISE_DATA_DIR: dir })).toBe(path.join(dir, 'session-secret'));
    expect(localSecretPath({})).toBe(path.resolve('data', 'session-secret'));
  });
});

describe('authSecret', () => {
  it('reads a local run\'s secret from the data directory, never a value derived from the database path', () => {
    const database = path.join(dir, 'partwise.sqlite');
    Object.assign(process.env, { PARTWISE_LOCAL: '1', PARTWISE_DATA_DIR: dir, DATABASE_URL: database, NODE_ENV: 'production' });
    delete process.env.NEXTAUTH_SECRET;
    delete process.env.AUTH_SECRET;
    expect(() => authSecret(), 'no file yet: nothing to sign with').toThrow(/does not exist/);
    const { secret } = ensureLocalSecret(localSecretPath());
    expect(authSecret()).toBe(secret);
    for (const db of [database, 'data/partwise.sqlite']) {
      expect(authSecret()).not.toBe(createHash('sha256').update(`partwise-local:${db}`).digest('hex'));
    }
  });

  it('has no fallback outside a local run: no derived secret, no build placeholder', () => {
    delete process.env.NEXTAUTH_SECRET;
    delete process.env.AUTH_SECRET;
    delete process.env.PARTWISE_LOCAL;
    for (const nodeEnv of ['production', 'development', 'test']) {
      (process.env as Record<string, string>).NODE_ENV = nodeEnv;
      expect(() => authSecret()).toThrow(/NEXTAUTH_SECRET is not set/);
    }
    process.env.NEXT_PHASE = 'phase-production-build';
    expect(() => authSecret()).toThrow(/NEXTAUTH_SECRET is not set/);
    process.env.NEXTAUTH_SECRET = 'a-configured-secret-of-forty-characters!!';
    expect(authSecret()).toBe('a-configured-secret-of-forty-characters!!');
  });
});
