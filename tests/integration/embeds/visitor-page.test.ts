import { beforeAll, describe, expect, it } from 'vitest';
import { loadCalculatorView, publisherCaution } from '@/lib/embeds/calculator-page';
import { publishNew, retireEmbed } from '@/lib/embeds/service';
import { DEFAULT_CAUTION } from '@/lib/fitting/models';
import { MixtureModel } from '@/models';
import { createModel, modelWorkspace } from './fixtures';

/** What the calculator page is given for the visitor fixes of issue 14: cautions, and the host link of a switched-off calculator. */
let ws: Awaited<ReturnType<typeof modelWorkspace>>;
const acting = () => ({ user: ws.owner, workspace: ws.workspace });

beforeAll(async () => {
  ws = await modelWorkspace();
});

describe('the calculator page for visitors', () => {
  it("drops a caution that is still the models' default text (the general caution already says it), keeps the publisher's own", async () => {
    expect(publisherCaution(DEFAULT_CAUTION)).toBe('');
    expect(publisherCaution(`  ${DEFAULT_CAUTION.toUpperCase().replace(/ /g, '  ')} `)).toBe('');
    expect(publisherCaution(' Try a group ride before you decide. ')).toBe('Try a group ride before you decide.');

    const model = await createModel(ws.workspace.id, ws.owner.id, 3, 'Default caution');
    await MixtureModel.update({ caution: DEFAULT_CAUTION }, { where: { id: model.id } });
    const { embed } = await publishNew(acting(), { mixtureModelId: model.id, title: 'Default caution' });
    const view = await loadCalculatorView(embed.token, undefined);
    expect(view.state === 'ready' && view.props.caution).toBe('');
  });

  it('gives a switched-off calculator the host origin (only an allowed one), so the loader keeps its notice on screen', async () => {
    const { embed } = await publishNew(acting(), { mixtureModelId: ws.model.id, title: 'Retired', allowedOrigins: ['https://club.example'] });
    await retireEmbed(acting(), embed.id);
    expect(await loadCalculatorView(embed.token, 'https://club.example')).toEqual({ state: 'unavailable', theme: 'light', token: embed.token, hostOrigin: 'https://club.example', language: 'en' });
    expect(await loadCalculatorView(embed.token, 'https://copycat.example')).toMatchObject({ state: 'unavailable', hostOrigin: null });
  });
});
