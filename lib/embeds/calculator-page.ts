import 'server-only';
import { AppError } from '@/lib/errors';
import { DEFAULT_CAUTION } from '@/lib/fitting/models';
import { resolveLanguage, type Language } from '@/lib/i18n/languages';
import { isServing, loadServedEmbed, loadServedVersion } from '@/lib/scoring/served';
import { membershipChartSpec } from './chart-spec';
import { DEFAULT_ACCENT, isHexColour, labelOn, nearestPassingAccent } from './contrast';
import { normalizeOrigin } from './origins';

/** Everything the calculator page renders, or why it cannot. */
export type CalculatorView =
  | { state: 'missing' }
  | { state: 'unavailable'; theme: 'light' | 'dark'; token: string; hostOrigin: string | null; language: Language }
  | { state: 'ready'; props: CalculatorProps };

export interface CalculatorProps {
  token: string;
  title: string;
  fields: { feature: string; label: string; unit: string; min: number; max: number; help: string; optional: boolean }[];
  clusters: { label: string; description: string; color: string }[];
  caution: string;
  theme: 'light' | 'dark';
  accent: string;
  accentText: string;
  threshold: number;
  /** The host page's origin, when it is one of the embed's allowed origins: size messages go only there. */
  hostOrigin: string | null;
  chartSpec: object;
  /** The language of the calculator's fixed texts and number formats, resolved for this visitor. */
  language: Language;
}

/** Readable text on the accent colour: ink or white, whichever contrasts more (WCAG 2.1 ratio). */
export const textOn = labelOn;

/** `acceptLanguage` is the visitor's Accept-Language header, used when the publisher chose 'auto'. */
export async function loadCalculatorView(token: string, host: string | undefined, acceptLanguage?: string | null): Promise<CalculatorView> {
  const embed = await loadServedEmbed(token);
  if (!embed) return { state: 'missing' };
  const requestedHost = host ? normalizeOrigin(host) : null;
  const hostOrigin = requestedHost && embed.allowedOrigins.includes(requestedHost) ? requestedHost : null;
  const language = resolveLanguage(embed.language, acceptLanguage);
  const unavailable = { state: 'unavailable', theme: embed.theme, token: embed.token, hostOrigin, language } as const;
  if (!isServing(embed)) return unavailable;
  let version;
  try {
    version = await loadServedVersion(embed.activeVersionId!);
  } catch (e) {
    if (e instanceof AppError) return unavailable;
    throw e;
  }
  // Saving refuses a colour that is hard to see; one saved before that rule is shown as its nearest passing colour.
  const accent = nearestPassingAccent(isHexColour(embed.accentColor) ? embed.accentColor : DEFAULT_ACCENT, embed.theme);
  const { fields, clusters, caution } = version.payload;
  return {
    state: 'ready',
    props: {
      token: embed.token,
      title: embed.title,
      fields: fields.map((f) => ({ feature: f.feature, label: f.label, unit: f.unit, min: f.min, max: f.max, help: f.help, optional: f.optional === true })),
      clusters: clusters.map((c) => ({ label: c.label, description: c.description, color: c.color })),
      caution: publisherCaution(caution),
      theme: embed.theme,
      accent,
      accentText: textOn(accent),
      threshold: embed.typicalityThreshold,
      hostOrigin,
      chartSpec: membershipChartSpec(clusters, embed.theme),
      language,
    },
  };
}

/**
 * The publisher's own caution, shown beside the general one. Models start with a default
 * text that says what the general caution already says; shown as the publisher's, it would
 * only repeat it, so only text the publisher actually wrote is kept.
 */
export function publisherCaution(text: string): string {
  const words = (t: string) => t.trim().replace(/\s+/g, ' ').toLowerCase();
  return words(text) === words(DEFAULT_CAUTION) ? '' : text.trim();
}
