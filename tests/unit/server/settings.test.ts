import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { productionSettingProblems } from '@/lib/server/settings';
import { ensureLocalSecret } from '@/lib/auth/local-secret';
import { KNOWN_PAYMENT_KEYS, KNOWN_SESSION_SECRETS, KNOWN_WEBHOOK_SECRETS } from '@/lib/server/known-secrets';

const good = { NEXTAUTH_SECRET: 'Zq4v8GmL1rT6yXw2Nc9Hs3Kd7Pf5Jb0Ua1Ee8Ri4', NEXTAUTH_URL: 'https://partwise.example.com' };
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'partwise-settings-'));
afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

describe('production settings', () => {
  it('refuse a fit queue the app does not know, and pg-boss without PostgreSQL, in one line each', () => {
    expect(productionSettingProblems({ ...good, PARTWISE_FIT_QUEUE: 'pg-boss', DATABASE_URL: 'postgres://p@db.example/partwise' })).toEqual([]);
    expect(productionSettingProblems({ ...good, PARTWISE_FIT_QUEUE: 'in-process' })).toEqual([]);
    expect(productionSettingProblems({ ...good, PARTWISE_FIT_QUEUE: 'pg-boss' })).toEqual([expect.stringMatching(/^PARTWISE_FIT_QUEUE=pg-boss needs DATABASE_URL to be a postgres:\/\/ address/)]);
    expect(productionSettingProblems({ ...good, PARTWISE_FIT_QUEUE: 'redis' })).toEqual([expect.stringMatching(/^PARTWISE_FIT_QUEUE is "redis", which Partwise does not know/)]);
  });
  it('accept a complete configuration', () => {
    expect(productionSettingProblems(good)).toEqual([]);
    expect(productionSettingProblems({ ...good, STRIPE_SECRET_KEY: 'sk_live_x', STRIPE_WEBHOOK_SECRET: 'whsec_x' })).toEqual([]);
  });

  it('name each missing or weak setting and what to do about it', () => {
    expect(productionSettingProblems({ NEXTAUTH_URL: good.NEXTAUTH_URL })).toEqual([expect.stringMatching(/^NEXTAUTH_SECRET is not set.*long random string/)]);
    expect(productionSettingProblems({ ...good, NEXTAUTH_SECRET: 'short' })).toEqual([expect.stringMatching(/only 5 characters long; use at least 32/)]);
    expect(productionSettingProblems({ NEXTAUTH_SECRET: good.NEXTAUTH_SECRET })).toEqual([expect.stringMatching(/^NEXTAUTH_URL is not set/)]);
    expect(productionSettingProblems({ ...good, NEXTAUTH_URL: 'partwise.example.com' })).toEqual([expect.stringMatching(/is not an absolute address/)]);
    expect(productionSettingProblems({ ...good, STRIPE_SECRET_KEY: 'sk_live_x' })).toEqual([expect.stringMatching(/STRIPE_WEBHOOK_SECRET is not/)]);
    expect(productionSettingProblems({})).toHaveLength(2);
  });

  it('refuse session secrets published in the source, in a deployment and in a local run', () => {
    for (const secret of [...KNOWN_SESSION_SECRETS, 'test-stack-secret-not-for-production', 'system-test-secret-0123456789-abcdef', 'build-phase-placeholder']) {
      for (const local of [{}, { PARTWISE_LOCAL: '1' }]) {
        expect(productionSettingProblems({ ...good, ...local, NEXTAUTH_SECRET: secret }), secret).toEqual([expect.stringMatching(/^NEXTAUTH_SECRET is a value published in the Partwise source/)]);
      }
    }
    expect(productionSettingProblems({ ...good, NEXTAUTH_SECRET: undefined, AUTH_SECRET: 'integration-test-secret-not-for-production' })).toEqual([expect.stringMatching(/published in the Partwise source/)]);
  });

  it('refuse the payment fake\'s old fixed keys and the tests\' keys in a deployment', () => {
    const fake = { STRIPE_SECRET_KEY: 'sk_test_partwise_local_fake', STRIPE_WEBHOOK_SECRET: 'whsec_partwise_local_fake_signing_secret' };
    expect(productionSettingProblems({ ...good, ...fake })).toEqual([expect.stringMatching(/^STRIPE_SECRET_KEY is a key published/), expect.stringMatching(/^STRIPE_WEBHOOK_SECRET is a signing secret published.*forge/)]);
    expect(productionSettingProblems({ ...good, STRIPE_SECRET_KEY: 'sk_live_mine', STRIPE_WEBHOOK_SECRET: 'whsec_catalogue_secret' })).toEqual([expect.stringMatching(/^STRIPE_WEBHOOK_SECRET is a signing secret published/)]);
    for (const key of KNOWN_PAYMENT_KEYS) expect(productionSettingProblems({ ...good, STRIPE_SECRET_KEY: key, STRIPE_WEBHOOK_SECRET: 'whsec_mine' }), key).toHaveLength(1);
    for (const key of KNOWN_WEBHOOK_SECRETS) expect(productionSettingProblems({ ...good, STRIPE_SECRET_KEY: 'sk_live_mine', STRIPE_WEBHOOK_SECRET: ` ${key}\n` }), key).toHaveLength(1);
    // Random keys of a test-mode account (or of the fake started per run) are fine.
    expect(productionSettingProblems({ ...good, STRIPE_SECRET_KEY: 'sk_test_51Qx8w2random', STRIPE_WEBHOOK_SECRET: 'whsec_9f8e7d6c5b4a' })).toEqual([]);
  });

  it('let a local run (npm start without a secret) sign with its random owner-only secret file, and nothing else', () => {
    const dataDir = path.join(tmp, 'local');
    const local = { PARTWISE_LOCAL: '1', PARTWISE_DATA_DIR: dataDir, NEXTAUTH_URL: 'http://localhost:3000' };
    expect(productionSettingProblems(local), 'no secret file: no secret').toEqual([expect.stringMatching(/^Local run: the local session secret .*session-secret does not exist/)]);
    ensureLocalSecret(path.join(dataDir, 'session-secret'));
    expect(productionSettingProblems(local)).toEqual([]);
    fs.chmodSync(path.join(dataDir, 'session-secret'), 0o604);
    expect(productionSettingProblems(local)).toEqual([expect.stringMatching(/readable by others \(mode 604\)/)]);
    fs.chmodSync(path.join(dataDir, 'session-secret'), 0o600);
    // The fake's keys are random per start in a local run; the check only applies to deployments.
    expect(productionSettingProblems({ ...local, STRIPE_SECRET_KEY: 'sk_test_partwise_local_fake', STRIPE_WEBHOOK_SECRET: 'whsec_partwise_local_fake_signing_secret' })).toEqual([]);
    expect(productionSettingProblems({ ...local, NEXTAUTH_SECRET: 'short' }), 'a configured secret is checked in a local run too').toEqual([expect.stringMatching(/only 5 characters/)]);
  });
});
