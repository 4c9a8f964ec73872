import { describe, expect, it } from 'vitest';
import { actionLabel, detailSummary } from '@/lib/support/audit-words';
import { servedVersionWords, statusWords } from '@/lib/embeds/status-words';

describe('audit trail wording', () => {
  it('labels origin and settings changes apart, and writes details in words, not keys', () => {
    expect(actionLabel('embed.origins')).toBe('Allowed sites changed');
    expect(actionLabel('embed.settings')).toBe('Calculator settings changed');
    expect(detailSummary({ title: 'Ride groups', added: ['https://club.example'], removed: [] })).toBe('Calculator: Ride groups · Sites added: https://club.example');
    expect(detailSummary({ title: 'Ride groups', changes: [{ setting: 'accentColor', from: '#2f6f5e', to: '#7a3b2e' }, { setting: 'typicalityThreshold', from: 5, to: 2.5 }] })).toBe(
      'Calculator: Ride groups · Changed: accent colour #2f6f5e → #7a3b2e; unusual-values threshold (percentile) 5 → 2.5',
    );
    expect(detailSummary({ reason: 'Spam', closedReports: 2, lastHour: 12500 })).toBe('Reason: Spam · Answers in the last hour: 12,500 · Reports closed with it: 2');
    const summary = detailSummary({ reason: 'x', previousReason: 'y', usualPerHour: 3, version: 4 });
    expect(summary).not.toMatch(/previousReason|usualPerHour|closedReports/);
    expect(summary).toContain('Version: v4');
  });

  it('an action without a label still shows, by its code', () => {
    expect(actionLabel('something.new')).toBe('something.new');
  });
});

describe('calculator status words', () => {
  it('one word per state for studio and support, and the served version follows the calculator', () => {
    expect(statusWords('disabled')).toBe('Switched off by support');
    expect(statusWords('active')).toBe('Live');
    expect(servedVersionWords('active')).toBe('Served');
    expect(servedVersionWords('disabled')).toBe('Selected, not answering: switched off by support');
    expect(servedVersionWords('retired')).not.toBe('Served');
  });
});
