import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import net from 'node:net';
import { AuditEvent, Subscription } from '@/models';
import { POST as planPOST } from '@/app/api/billing/plan/route';
import { workspacePlan } from '@/lib/billing/limits';
import { makeRequest } from '../../helpers/auth';
import { ownerWorkspace, startBillingStack, startCheckout, subscribe, type BillingStack } from './stack';

let stack: BillingStack;
beforeAll(async () => {
  stack = await startBillingStack();
});
afterAll(async () => {
  await stack.stop();
});

/** A loopback port with nothing listening. */
async function closedPort(): Promise<number> {
  const server = net.createServer();
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()));
  const { port } = server.address() as net.AddressInfo;
  await new Promise<void>((r) => server.close(() => r()));
  return port;
}

describe('when the payment service is down or failing', () => {
  it('unreachable: checkout answers 503 with a clear message, and no plan or customer changes', async () => {
    const { ws, owner } = await ownerWorkspace();
    const realPort = process.env.STRIPE_API_PORT;
    process.env.STRIPE_API_PORT = String(await closedPort());
    try {
      const res = await startCheckout(owner.id, 'bench');
      expect(res.status).toBe(503);
      expect(res.body.error!.code).toBe('unavailable');
      expect(res.body.error!.message).toMatch(/payment service could not be reached/);
      expect(res.body.error!.message).toMatch(/Nothing was charged and your plan is unchanged/);
    } finally {
      process.env.STRIPE_API_PORT = realPort;
    }
    const row = await Subscription.findOne({ where: { workspaceId: ws.id } });
    expect(row?.plan ?? 'sketch').toBe('sketch');
    expect(row?.customerRef ?? null).toBeNull();
    expect(await AuditEvent.count({ where: { workspaceId: ws.id, action: 'billing.checkout_started' } })).toBe(0);
    // Back up: the same owner can check out.
    expect((await startCheckout(owner.id, 'bench')).status).toBe(201);
  });

  it('failing: checkout answers 502 and the owner can retry', async () => {
    const { owner } = await ownerWorkspace();
    stack.fake.failNext(1, 500);
    const res = await startCheckout(owner.id, 'lab');
    expect(res.status).toBe(502);
    expect(res.body.error!.message).toMatch(/payment service reported a problem/);
    expect((await startCheckout(owner.id, 'lab')).status).toBe(201);
  });

  it('a plan change that fails leaves the plan as it was', async () => {
    const { ws, owner } = await ownerWorkspace();
    await subscribe(stack, owner.id, ws.id, 'bench');
    const realPort = process.env.STRIPE_API_PORT;
    process.env.STRIPE_API_PORT = String(await closedPort());
    try {
      const res = await planPOST(await makeRequest('/api/billing/plan', { userId: owner.id, json: { plan: 'lab' } }), { params: Promise.resolve({}) });
      expect(res.status).toBe(503);
    } finally {
      process.env.STRIPE_API_PORT = realPort;
    }
    expect((await workspacePlan(ws.id)).id).toBe('bench');
  });

  it('billing without configuration says so instead of failing obscurely', async () => {
    const { owner } = await ownerWorkspace();
    const key = process.env.STRIPE_SECRET_KEY;
    delete process.env.STRIPE_SECRET_KEY;
    try {
      const res = await startCheckout(owner.id, 'bench');
      expect(res.status).toBe(503);
      expect(res.body.error!.message).toMatch(/Billing is not set up on this server/);
    } finally {
      process.env.STRIPE_SECRET_KEY = key;
    }
  });
});
