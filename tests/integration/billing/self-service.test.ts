import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Subscription } from '@/models';
import { POST as selfServicePOST } from '@/app/api/billing/self-service/route';
import { makeRequest } from '../../helpers/auth';
import { ownerWorkspace, startBillingStack, subscribe, type BillingStack } from './stack';

let stack: BillingStack;
beforeAll(async () => {
  stack = await startBillingStack();
});
afterAll(async () => {
  await stack.stop();
});

const open = async (userId: number) => {
  const res = await selfServicePOST(await makeRequest('/api/billing/self-service', { userId, method: 'POST' }), { params: Promise.resolve({}) });
  return { status: res.status, body: await res.json() };
};
const form = (url: string, fields: Record<string, string>) => fetch(url, { method: 'POST', body: new URLSearchParams(fields) });

describe("the payment service's self-service page", () => {
  it('shows the card on file, refuses a declined replacement, and a cancellation there reaches Partwise by webhook', async () => {
    const { ws, owner, member } = await ownerWorkspace();
    expect((await open(owner.id)).status).toBe(409);
    await subscribe(stack, owner.id, ws.id, 'bench');
    expect((await open(member.id)).status).toBe(403);
    const opened = await open(owner.id);
    expect(opened.status).toBe(201);
    const url: string = opened.body.url;
    expect(url).toMatch(new RegExp(`^${stack.fake.url}/portal/bps_`));

    const page = await (await fetch(url)).text();
    expect(page).toContain('Visa ending in <b>4242</b>');
    expect(page).toContain('http://localhost:3000/studio/billing');

    const declined = await form(`${url}/card`, { number: '4000 0000 0000 0002', expiry: '10/33', cvc: '321' });
    expect(declined.status).toBe(402);
    expect(await declined.text()).toContain('Your card was declined.');
    const kept = await form(`${url}/card`, { number: '4242 4242 4242 4242', expiry: '10/33', cvc: '321' });
    expect(await kept.text()).toContain('expires 10/2033');

    const ref = (await Subscription.findOne({ where: { workspaceId: ws.id } }))!.subscriptionRef!;
    const cancelled = await form(`${url}/cancel`, { subscription: ref });
    expect(await cancelled.text()).toContain('ends with the current period');
    await stack.fake.webhooks.idle();
    expect(await Subscription.findOne({ where: { workspaceId: ws.id } })).toMatchObject({ plan: 'bench', cancelAtPeriodEnd: true });

    // Someone else's subscription id on this page does nothing.
    const { ws: other, owner: otherOwner } = await ownerWorkspace();
    await subscribe(stack, otherOwner.id, other.id, 'lab');
    const foreign = (await Subscription.findOne({ where: { workspaceId: other.id } }))!.subscriptionRef!;
    expect((await form(`${url}/cancel`, { subscription: foreign })).status).toBe(404);
    await stack.fake.webhooks.idle();
    expect((await Subscription.findOne({ where: { workspaceId: other.id } }))!.cancelAtPeriodEnd).toBe(false);
  });
});
