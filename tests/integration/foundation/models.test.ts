import { describe, expect, it } from 'vitest';
import * as m from '@/models';

describe('models against a migrated database', () => {
  it('each model can be created and read back', async () => {
    const user = await m.User.create({ email: 'ana@example.test', name: 'Ana', passwordHash: 'x'.repeat(60) });
    const workspace = await m.Workspace.create({ name: 'Lab', slug: 'lab-1' });
    await m.Membership.create({ userId: user.id, workspaceId: workspace.id, role: 'owner' });
    await m.Invitation.create({ workspaceId: workspace.id, email: 'b@example.test', role: 'member', tokenHash: 'a'.repeat(64), invitedById: user.id, expiresAt: new Date(Date.now() + 3600e3) });
    await m.AuthToken.create({ userId: user.id, purpose: 'verify-email', tokenHash: 'b'.repeat(64), expiresAt: new Date() });
    const dataset = await m.Dataset.create({ workspaceId: workspace.id, createdById: user.id, name: 'd', originalFilename: 'd.csv', originalCsv: Buffer.from('a\n1\n'), columns: [{ name: 'a', kind: 'numeric', count: 1, missing: 0, min: 1, max: 1, mean: 1, std: 0 }], cells: [[1]], rowCount: 1 });
    const fit = await m.Fit.create({ workspaceId: workspace.id, datasetId: dataset.id, params: { components: [1, 2] } });
    const model = await m.MixtureModel.create({ workspaceId: workspace.id, fitId: fit.id, datasetId: dataset.id, name: 'mm', model: { format: 'x' }, clusters: [{ label: 'A', description: '', color: '#000000' }], fields: [] });
    const embed = await m.Embed.create({ workspaceId: workspace.id, mixtureModelId: model.id, token: 'tok_'.padEnd(24, 'z'), title: 'Calc' });
    const version = await m.ModelVersion.create({ embedId: embed.id, mixtureModelId: model.id, number: 1, payload: { a: 1 }, checksum: 'c'.repeat(64) });
    await embed.update({ activeVersionId: version.id });
    await m.UsageCounter.create({ embedId: embed.id, workspaceId: workspace.id, granularity: 'month', period: '2026-12', count: 3 });
    await m.Subscription.create({ workspaceId: workspace.id, plan: 'sketch' });
    await m.Invoice.create({ workspaceId: workspace.id, invoiceRef: 'in_1', amountDue: 1900, status: 'open' });
    await m.AbuseReport.create({ embedId: embed.id, reason: 'spam', message: 'm' });
    await m.AuditEvent.create({ actorUserId: user.id, workspaceId: workspace.id, action: 'test.created', detail: { ok: true } });
    await m.MailMessage.create({ to: 'ana@example.test', subject: 's', text: 't', kind: 'test' });
    await m.WebhookEvent.create({ eventRef: 'evt_1', type: 'invoice.paid', processedAt: new Date() });

    const readEmbed = await m.Embed.findOne({ where: { token: embed.token }, include: [{ model: m.ModelVersion, as: 'activeVersion' }] });
    expect(readEmbed?.allowedOrigins).toEqual([]);
    expect(readEmbed?.status).toBe('active');
    expect((readEmbed as unknown as { activeVersion: m.ModelVersion }).activeVersion.payload).toEqual({ a: 1 });
    expect((await m.Dataset.findByPk(dataset.id))?.cells).toEqual([[1]]);
    expect((await m.Fit.findByPk(fit.id))?.status).toBe('queued');
    expect((await m.User.findByPk(user.id))?.isStaff).toBe(false);
    const counts = await Promise.all([m.Membership, m.Invitation, m.AuthToken, m.MixtureModel, m.UsageCounter, m.Subscription, m.Invoice, m.AbuseReport, m.AuditEvent, m.MailMessage, m.WebhookEvent].map((model) => (model as unknown as { count(): Promise<number> }).count()));
    expect(counts).toEqual(new Array(11).fill(1));
  });

  it('enforces uniqueness and foreign keys in the database itself', async () => {
    await m.User.create({ email: 'dup@example.test', name: 'D', passwordHash: 'x' });
    await expect(m.User.create({ email: 'dup@example.test', name: 'D2', passwordHash: 'x' })).rejects.toThrow();
    await expect(m.Membership.create({ userId: 999_999, workspaceId: 999_999, role: 'member' })).rejects.toThrow(/FOREIGN KEY|foreign key constraint/);
  });
});
