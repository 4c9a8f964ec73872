import { describe, expect, it } from 'vitest';
import { generateApiKey, hashApiKey, KEY_PREFIX_LENGTH, KEY_SECRET_LENGTH, parseApiKey, sameHash } from '@/lib/auth/api-key-format';
import { apiKeyCreateSchema } from '@/lib/auth/api-key-schemas';

describe('API key text', () => {
  it('makes keys pwk_<10>_<40> of letters and digits that parse back into their parts', () => {
    const seen = new Set<string>();
    for (let i = 0; i < 200; i++) {
      const { key, prefix, secretHash } = generateApiKey();
      expect(key).toMatch(new RegExp(`^pwk_[0-9A-Za-z]{${KEY_PREFIX_LENGTH}}_[0-9A-Za-z]{${KEY_SECRET_LENGTH}}$`));
      const parts = parseApiKey(key);
      expect(parts?.prefix).toBe(prefix);
      expect(parts?.secret).toHaveLength(KEY_SECRET_LENGTH);
      expect(`pwk_${parts!.prefix}_${parts!.secret}`).toBe(key);
      expect(secretHash).toBe(hashApiKey(key));
      expect(secretHash).not.toContain(parts!.secret);
      seen.add(prefix);
    }
    expect(seen.size).toBe(200);
  });

  it('refuses text that is not shaped like a key', () => {
    const { key } = generateApiKey();
    for (const bad of ['', 'pwk_', key.replace('pwk_', 'pk_'), key.slice(0, -20), ` ${key}`, `${key} `, key.replace(/_([^_]*)$/, '-$1'), `pwk_abc_${'x'.repeat(40)}`, `pwk_${'a'.repeat(10)}_${'b'.repeat(31)}`, key.slice(0, 14) + '!' + key.slice(15), `Bearer ${key}`]) {
      expect(parseApiKey(bad), JSON.stringify(bad)).toBeNull();
    }
  });

  it('hashes with SHA-256 as published (FIPS 180-2, appendix B.1: "abc")', () => {
    expect(hashApiKey('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(hashApiKey('pwk_a')).toHaveLength(64);
  });

  it('compares fingerprints whole: equal only when every byte is', () => {
    const h = hashApiKey('pwk_one');
    expect(sameHash(h, h)).toBe(true);
    expect(sameHash(h, hashApiKey('pwk_two'))).toBe(false);
    expect(sameHash(h, h.slice(0, 62))).toBe(false);
    expect(sameHash('', '')).toBe(false);
  });
});

describe('the make-a-key form schema', () => {
  it('takes a name, a non-empty set of known scopes and 1–730 days', () => {
    expect(apiKeyCreateSchema.parse({ name: ' Nightly ', scopes: ['read', 'fit'], expiresInDays: 30 })).toEqual({ name: 'Nightly', scopes: ['read', 'fit'], expiresInDays: 30 });
    const fields = (input: unknown) => (apiKeyCreateSchema.safeParse(input).error?.issues ?? []).map((i) => i.path.join('.'));
    expect(fields({ name: 'x', scopes: [] })).toEqual(['scopes']);
    expect(fields({ name: 'x', scopes: ['admin'] })).toEqual(['scopes.0']);
    expect(fields({ name: 'x', scopes: ['read', 'read'] })).toEqual(['scopes']);
    expect(fields({ name: '', scopes: ['read'] })).toEqual(['name']);
    expect(fields({ name: 'a\u0000b', scopes: ['read'] })).toEqual(['name']);
    expect(fields({ name: 'x', scopes: ['read'], expiresInDays: 0 })).toEqual(['expiresInDays']);
    expect(fields({ name: 'x', scopes: ['read'], expiresInDays: 731 })).toEqual(['expiresInDays']);
    expect(fields({ name: 'x', scopes: ['read'], expiresInDays: 1.5 })).toEqual(['expiresInDays']);
    expect(fields({ name: 'x', scopes: ['read'], admin: true })).toEqual(['']); // zod's own path; zodIssues (lib/http/handler.ts) names the key
  });
});
