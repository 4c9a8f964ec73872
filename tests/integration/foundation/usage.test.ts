import { describe, expect, it } from 'vitest';
import { Embed, UsageCounter, Workspace } from '@/models';
import { embedHourlyAnswers, flushUsage, pendingAnswers, embedMonthlyAnswers, hourPeriod, monthPeriod, recordAnswer, workspaceMonthlyAnswers } from '@/lib/usage';

describe('usage counters', () => {
  it('count every concurrent answer exactly once, per month and per hour', async () => {
    const ws = await Workspace.create({ name: 'U', slug: 'u' });
    const embed = await Embed.create({ workspaceId: ws.id, token: 'u'.repeat(24), title: 'U' });
    const at = new Date('2026-12-01T10:15:00Z');
    for (let i = 0; i < 200; i++) recordAnswer(embed, at);
    expect(pendingAnswers()).toBe(200);
    expect(await embedMonthlyAnswers(embed.id, monthPeriod(at))).toBe(200);
    expect(await workspaceMonthlyAnswers(ws.id, monthPeriod(at))).toBe(200);
    expect(await embedHourlyAnswers(embed.id, new Date('2026-12-01T00:00:00Z'))).toEqual([{ period: hourPeriod(at), count: 200 }]);
    expect(await UsageCounter.count()).toBe(2);
    expect(pendingAnswers()).toBe(0);
  });
});
