import { describe, expect, it } from 'vitest';
import { productionSettingProblems } from '@/lib/server/settings';

const good = { NEXTAUTH_SECRET: 'x'.repeat(48), NEXTAUTH_URL: 'https://partwise.example.com' };

describe('production settings', () => {
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

  it('let a local demo run (npm start without a secret) derive its own', () => {
    expect(productionSettingProblems({ PARTWISE_LOCAL: '1', NEXTAUTH_URL: 'http://localhost:3000' })).toEqual([]);
  });
});
