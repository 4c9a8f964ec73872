import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { beforeAll, describe, expect, it } from 'vitest';
import { Calculator } from '@/components/embed/Calculator';
import { CalculatorFrame, CalculatorUnavailable } from '@/components/embed/CalculatorFrame';
import { loadCalculatorView, type CalculatorProps } from '@/lib/embeds/calculator-page';
import { PATCH as settingsRoute } from '@/app/api/embeds/[id]/route';
import { describeEmbed, publishNew, retireEmbed, updateSettings } from '@/lib/embeds/service';
import { detailSummary } from '@/lib/support/audit-words';
import { makeRequest } from '../../helpers/auth';
import { AuditEvent, Embed } from '@/models';
import { modelWorkspace } from './fixtures';

/**
 * The calculator speaks the language its publisher chose, or the visitor's browser
 * language for 'auto': the server render of the page carries the fixed texts of that
 * language, its number formats and lang="…" on the calculator root. The publisher's
 * own words (title, labels, caution) stay as written.
 */
let ws: Awaited<ReturnType<typeof modelWorkspace>>;
let embed: Embed;
const acting = () => ({ user: ws.owner, workspace: ws.workspace });

beforeAll(async () => {
  ws = await modelWorkspace();
  embed = (await publishNew(acting(), { mixtureModelId: ws.model.id, title: 'Ride groups' })).embed;
});

async function renderPage(acceptLanguage: string | null): Promise<{ html: string; props: CalculatorProps }> {
  const view = await loadCalculatorView(embed.token, undefined, acceptLanguage);
  if (view.state !== 'ready') throw new Error(`expected ready, got ${view.state}`);
  const { props } = view;
  const html = renderToStaticMarkup(createElement(CalculatorFrame, { theme: props.theme, accent: props.accent, accentText: props.accentText, language: props.language, children: createElement(Calculator, props) }));
  return { html, props };
}

const text = (html: string) => html.replace(/<[^>]+>/g, ' ').replace(/&#x27;|&#39;/g, "'").replace(/&quot;/g, '"').replace(/&amp;/g, '&');

describe('the calculator page in the chosen language', () => {
  it("new calculators follow the visitor's browser ('auto'), stored and described as such", async () => {
    expect(embed.language).toBe('auto');
    expect(describeEmbed(embed).language).toBe('auto');
  });

  it('renders German fixed texts, German numbers and lang="de" for a German calculator, whatever the browser asks', async () => {
    await updateSettings(acting(), embed.id, { language: 'de' });
    const { html, props } = await renderPage('en-US,en;q=0.9');
    expect(props.language).toBe('de');
    expect(html).toMatch(/<main id="partwise-calculator-root" lang="de"/);
    const words = text(html);
    expect(words).toContain('Meine Gruppen zeigen');
    expect(words).toContain('Geben Sie Ihre Werte ein');
    expect(words).toContain('Zulässig: 10 bis 45 km/h.');
    // Grouped the German way: 3.000, not 3,000.
    expect(words).toContain('Zulässig: 0 bis 3.000 m.');
    expect(words).toContain('Die Wahrscheinlichkeiten beschreiben');
    expect(words).toContain('Diesen Rechner melden');
    expect(words).not.toContain('Show my groups');
    expect(words).not.toContain('Accepted:');
    // The publisher's words are not translated.
    expect(words).toContain('Ride groups');
    expect(words).toContain('Average speed');
    expect(words).toContain('Over a normal ride.');
    expect(words).toContain('Try a group ride before you decide.');
  });

  it("follows Accept-Language for 'auto', English when the browser asks for none of ours", async () => {
    await updateSettings(acting(), embed.id, { language: 'auto' });
    const fr = await renderPage('fr-CH, fr;q=0.9, en;q=0.8');
    expect(fr.props.language).toBe('fr');
    expect(fr.html).toContain('lang="fr"');
    expect(text(fr.html)).toContain('Voir mes groupes');
    expect(text(fr.html)).toMatch(/de 0 à 3[\u202f\u00a0 ]000 m\./);

    const es = await renderPage('es-MX,es;q=0.9');
    expect(es.props.language).toBe('es');
    expect(text(es.html)).toContain('Ver mis grupos');

    for (const header of ['ja-JP,ja;q=0.9', null]) {
      const en = await renderPage(header);
      expect(en.props.language).toBe('en');
      expect(en.html).toContain('lang="en"');
      expect(text(en.html)).toContain('Show my groups');
      expect(text(en.html)).toContain('Accepted: 0 to 3,000 m.');
    }
  });

  it('says a switched-off calculator is unavailable in its language', async () => {
    const { embed: other } = await publishNew(acting(), { mixtureModelId: ws.model.id, title: 'Retired in Spanish' });
    await updateSettings(acting(), other.id, { language: 'es' });
    await retireEmbed(acting(), other.id);
    const view = await loadCalculatorView(other.token, undefined, 'de');
    if (view.state !== 'unavailable') throw new Error(`expected unavailable, got ${view.state}`);
    expect(view.language).toBe('es');
    const html = renderToStaticMarkup(createElement(CalculatorUnavailable, view));
    expect(html).toContain('lang="es"');
    expect(text(html)).toContain('Esta calculadora no está disponible');
  });

  it('is set through the settings route: a language we do not speak is a 422 naming the field, and the saved one stays', async () => {
    const patch = async (json: unknown) => settingsRoute(await makeRequest(`/api/embeds/${embed.id}`, { method: 'PATCH', userId: ws.member.id, json }), { params: Promise.resolve({ id: String(embed.id) }) });
    const ok = await patch({ language: 'fr' });
    expect(ok.status).toBe(200);
    expect((await ok.json()).embed.language).toBe('fr');
    for (const language of ['nl', 'DE', '', 3, null]) {
      const bad = await patch({ language });
      expect(bad.status).toBe(422);
      const issues = (await bad.json()).error.issues as { field: string; message: string }[];
      expect(issues).toHaveLength(1);
      expect(issues[0].field).toBe('language');
      expect(issues[0].message).toMatch(/English, German, French, Spanish/);
    }
    await embed.reload();
    expect(embed.language).toBe('fr');
    // The studio's trail words the change.
    const trail = await AuditEvent.findOne({ where: { action: 'embed.settings', targetId: String(embed.id) }, order: [['id', 'DESC']] });
    expect(detailSummary(trail!.detail as Record<string, unknown>)).toContain('calculator language');
  });
});
