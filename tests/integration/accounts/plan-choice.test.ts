import { describe, expect, it } from 'vitest';
import { makeRequest } from '../../helpers/auth';
import { POST as signUpRoute } from '@/app/api/account/signup/route';
import { useMailSink } from './mail-helpers';

/**
 * "Choose Bench" on the plans page: the plan survives sign-up. The verification link
 * carries it, so the sign-in after confirming leads to billing with it on offer.
 */
const sink = useMailSink();
const ctx = { params: Promise.resolve({}) };
const body = (email: string, extra: Record<string, unknown> = {}) => ({ name: 'Ines Ride', email, password: 'copper-kettle-harbour-41', workspaceName: 'Hill Club', ...extra });
const signUp = async (json: unknown) => signUpRoute(await makeRequest('/api/account/signup', { json, headers: { 'x-forwarded-for': '203.0.113.50' } }), ctx);

describe('a plan chosen before signing up', () => {
  it('rides along in the verification link', async () => {
    const res = await signUp(body('bench.rider@example.test', { plan: 'bench' }));
    expect(res.status).toBe(202);
    const mail = await sink.mailTo('bench.rider@example.test', 'verify-email');
    const link = new URL(mail.links.find((l) => new URL(l).pathname === '/verify')!);
    expect(link.searchParams.get('plan')).toBe('bench');
    expect(link.searchParams.get('token')).toBeTruthy();
  });

  it('is left out for the free start, and an unknown plan is refused on its field', async () => {
    expect((await signUp(body('free.rider@example.test'))).status).toBe(202);
    const mail = await sink.mailTo('free.rider@example.test', 'verify-email');
    expect(new URL(mail.links.find((l) => new URL(l).pathname === '/verify')!).searchParams.has('plan')).toBe(false);
    const bad = await signUp(body('gold.rider@example.test', { plan: 'gold' }));
    expect(bad.status).toBe(422);
    expect((await bad.json()).error.issues[0].field).toBe('plan');
  });
});
