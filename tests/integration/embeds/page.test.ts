import { beforeAll, describe, expect, it } from 'vitest';
import { loadCalculatorView, textOn } from '@/lib/embeds/calculator-page';
import { publishNew, retireEmbed, updateSettings } from '@/lib/embeds/service';
import { invalidateEmbed } from '@/lib/scoring';
import { Embed, Workspace } from '@/models';
import { modelWorkspace } from './fixtures';

let ws: Awaited<ReturnType<typeof modelWorkspace>>;
let embed: Embed;
const acting = () => ({ user: ws.owner, workspace: ws.workspace });

beforeAll(async () => {
  ws = await modelWorkspace();
  embed = (await publishNew(acting(), { mixtureModelId: ws.model.id, title: 'Ride groups', allowedOrigins: ['https://club.example'] })).embed;
});

describe('what the calculator page renders', () => {
  it('renders the served version: fields, labels, caution, theme and a compiled vega chart', async () => {
    const view = await loadCalculatorView(embed.token, undefined);
    if (view.state !== 'ready') throw new Error(`expected ready, got ${view.state}`);
    expect(view.props.fields.map((f) => f.label)).toEqual(['Average speed', 'Weekly distance', 'Climbing per ride']);
    expect(view.props.clusters[0]).toEqual({ label: 'Easy social', description: 'Riders like group 1.', color: '#3a8a74' });
    expect(view.props.caution).toBe('Try a group ride before you decide.');
    expect(view.props.threshold).toBe(1);
    expect(view.props.hostOrigin).toBeNull();
    // A vega (not vega-lite) spec with the dataset the component fills, as plain JSON.
    const spec = view.props.chartSpec as { $schema: string; data: { name: string }[] };
    expect(spec.$schema).toMatch(/schema\/vega\/v/);
    expect(spec.data.map((d) => d.name)).toContain('memberships');
    expect(JSON.parse(JSON.stringify(spec))).toEqual(spec);
  });

  it('accepts the host origin for size messages only when it is on the allowed list', async () => {
    const ok = await loadCalculatorView(embed.token, 'https://CLUB.example');
    expect(ok.state === 'ready' && ok.props.hostOrigin).toBe('https://club.example');
    const other = await loadCalculatorView(embed.token, 'https://copycat.example');
    expect(other.state === 'ready' && other.props.hostOrigin).toBeNull();
    const junk = await loadCalculatorView(embed.token, 'javascript:alert(1)');
    expect(junk.state === 'ready' && junk.props.hostOrigin).toBeNull();
  });

  it('is missing for unknown tokens and unavailable when disabled, suspended or retired', async () => {
    expect((await loadCalculatorView('NoSuchCalculatorToken_0000', undefined)).state).toBe('missing');
    await embed.update({ status: 'disabled', disabledReason: 'review' });
    invalidateEmbed(embed.id);
    expect((await loadCalculatorView(embed.token, undefined)).state).toBe('unavailable');
    await embed.update({ status: 'active', disabledReason: null });
    await Workspace.update({ suspendedAt: new Date() }, { where: { id: ws.workspace.id } });
    invalidateEmbed(embed.id);
    expect((await loadCalculatorView(embed.token, undefined)).state).toBe('unavailable');
    await Workspace.update({ suspendedAt: null }, { where: { id: ws.workspace.id } });
    invalidateEmbed(embed.id);
    await updateSettings(acting(), embed.id, { theme: 'dark', accentColor: '#e0a526' });
    const dark = await loadCalculatorView(embed.token, undefined);
    expect(dark.state === 'ready' && dark.props.theme).toBe('dark');
    await retireEmbed(acting(), embed.id);
    expect(await loadCalculatorView(embed.token, undefined)).toEqual({ state: 'unavailable', theme: 'dark', token: embed.token, hostOrigin: null, language: 'en' });
  });

  it('picks readable text for the accent colour', () => {
    expect(textOn('#2f6f5e')).toBe('#ffffff');
    expect(textOn('#e0a526')).toBe('#1d2330');
  });
});
