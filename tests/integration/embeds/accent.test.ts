import { beforeAll, describe, expect, it } from 'vitest';
import { makeRequest } from '../../helpers/auth';
import { POST as publishRoute } from '@/app/api/embeds/route';
import { PATCH as settingsRoute } from '@/app/api/embeds/[id]/route';
import { accentPasses, DEFAULT_ACCENT } from '@/lib/embeds/contrast';
import { loadCalculatorView } from '@/lib/embeds/calculator-page';
import { invalidateEmbed } from '@/lib/scoring/served';
import { AuditEvent, Embed } from '@/models';
import { modelWorkspace } from './fixtures';

/** The accent colour is checked against the theme's background when it (or the theme) is saved. */
const idCtx = (id: number) => ({ params: Promise.resolve({ id: String(id) }) });
let ws: Awaited<ReturnType<typeof modelWorkspace>>;
beforeAll(async () => {
  ws = await modelWorkspace();
});

async function publish(): Promise<{ id: number; token: string; accentColor: string; theme: string }> {
  const res = await publishRoute(await makeRequest('/api/embeds', { userId: ws.member.id, workspaceId: ws.workspace.id, json: { mixtureModelId: ws.model.id, title: 'Ride groups' } }), { params: Promise.resolve({}) });
  expect(res.status).toBe(201);
  return (await res.json()).embed;
}

async function patch(id: number, json: unknown) {
  const res = await settingsRoute(await makeRequest(`/api/embeds/${id}`, { method: 'PATCH', userId: ws.member.id, workspaceId: ws.workspace.id, json }), idCtx(id));
  return { status: res.status, body: await res.json() };
}

describe('accent colour contrast on save', () => {
  it('publishes with the default accent, which passes on the default (light) theme', async () => {
    const embed = await publish();
    expect(embed.accentColor).toBe(DEFAULT_ACCENT);
    expect(embed.theme).toBe('light');
    expect(accentPasses(embed.accentColor, 'light')).toBe(true);
  });

  it('refuses a colour too light for the light theme with 422 on accentColor, proposing the nearest passing colour, and keeps the saved one', async () => {
    const embed = await publish();
    const { status, body } = await patch(embed.id, { title: 'Renamed', theme: 'light', accentColor: '#F0C763' });
    expect(status).toBe(422);
    expect(body.error.code).toBe('invalid_input');
    expect(body.error.issues).toEqual([
      {
        field: 'accentColor',
        suggestion: '#be8c12',
        message: '#f0c763 is hard to see on the light theme: the contrast of the button and focus ring against the light background is only 1.60:1 (3:1 needed). The nearest colour that passes is #be8c12.',
      },
    ]);
    const stored = (await Embed.findByPk(embed.id))!;
    expect(stored.accentColor).toBe(DEFAULT_ACCENT);
    expect(stored.title).toBe('Ride groups');
    expect(await AuditEvent.count({ where: { action: 'embed.settings', targetId: String(embed.id) } })).toBe(0);

    // The proposal is accepted as it is.
    const retry = await patch(embed.id, { title: 'Renamed', theme: 'light', accentColor: body.error.issues[0].suggestion });
    expect(retry.status).toBe(200);
    expect(retry.body.embed.accentColor).toBe('#be8c12');
  });

  it('refuses a colour no label can be read on (4.5:1 for the button text), on either theme', async () => {
    const embed = await publish();
    for (const theme of ['light', 'dark'] as const) {
      const { status, body } = await patch(embed.id, { theme, accentColor: '#777777' });
      expect(status).toBe(422);
      expect(body.error.issues[0].field).toBe('accentColor');
      expect(body.error.issues[0].message).toContain('the button label on this colour is only 4.47:1 (4.5:1 needed)');
      expect(accentPasses(body.error.issues[0].suggestion, theme)).toBe(true);
    }
  });

  it('refuses a theme change that leaves the saved colour hard to see, naming the colour field', async () => {
    const embed = await publish();
    const { status, body } = await patch(embed.id, { theme: 'dark' });
    expect(status).toBe(422);
    expect(body.error.issues).toHaveLength(1);
    expect(body.error.issues[0].field).toBe('accentColor');
    expect(body.error.issues[0].suggestion).toBe('#2f705f');
    expect(body.error.message).toMatch(/^The saved accent colour does not suit the dark theme\. #2f6f5e is hard to see on the dark theme/);
    expect((await Embed.findByPk(embed.id))!.theme).toBe('light');

    // Saffron suits the dark theme.
    expect((await patch(embed.id, { theme: 'dark', accentColor: '#e0a526' })).status).toBe(200);
    // ... and going back to light with it is refused in turn.
    const back = await patch(embed.id, { theme: 'light' });
    expect(back.status).toBe(422);
    expect(back.body.error.issues[0].suggestion).toBe('#bf8b1b');
  });

  it('does not hold up other edits of a calculator whose colour was saved before the rule, and shows it as a passing colour', async () => {
    const embed = await publish();
    await Embed.update({ theme: 'dark' }, { where: { id: embed.id } });
    invalidateEmbed(embed.id);
    expect((await patch(embed.id, { title: 'Still editable' })).status).toBe(200);
    const view = await loadCalculatorView(embed.token, undefined);
    expect(view.state).toBe('ready');
    if (view.state !== 'ready') return;
    expect(view.props.accent).toBe('#2f705f');
    expect(view.props.accentText).toBe('#ffffff');
  });
});
