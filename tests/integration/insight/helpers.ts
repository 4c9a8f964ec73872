import { publishNew, publishVersion } from '@/lib/embeds/service';
import { rateLimitTesting } from '@/lib/rate-limit';
import { rereadScoringSettings, scoreForToken, type ScoreAnswer } from '@/lib/scoring';
import { Embed, MixtureModel } from '@/models';
import { modelWorkspace } from '../embeds/fixtures';

/** Lift the per-address, per-token and burst limits: these tests send hundreds of answers at once. */
export function liftScoringLimits(): void {
  process.env.PARTWISE_SCORE_ADDRESS_BURST = '1000000000';
  process.env.PARTWISE_SCORE_TOKEN_BURST = '1000000000';
  process.env.PARTWISE_SCORE_BURST_SCALE = '1000000';
  rereadScoringSettings();
  rateLimitTesting.clear();
}

/** A workspace with a calculator published from the 3-field ride model; climbing may be left blank. */
export async function insightCalculator() {
  const ws = await modelWorkspace();
  const fields = ws.model.fields.map((f) => (f.feature === 'climb_per_ride_m' ? { ...f, optional: true } : f));
  await ws.model.update({ fields });
  const acting = { user: ws.owner, workspace: ws.workspace };
  const { embed, version } = await publishNew(acting, { mixtureModelId: ws.model.id, title: 'Ride groups' });
  return { ...ws, acting, embed, version };
}

export async function republish(acting: Parameters<typeof publishVersion>[0], embed: Embed, model?: MixtureModel) {
  return publishVersion(acting, embed.id, model ? { mixtureModelId: model.id } : {});
}

/** One answer through the public scoring flow (the route and the server's fast path both run it). */
export async function answer(token: string, values: Record<string, number | null>, address = '198.51.100.7'): Promise<ScoreAnswer> {
  const text = JSON.stringify({ values });
  const { answer: a } = await scoreForToken(token, { headers: new Headers({ 'content-type': 'application/json' }), text: async () => text, address, requestOrigin: 'http://localhost:3000' });
  return a;
}

/** Deterministic values for tests (a small LCG, not the engine's PRNG). */
export function values(seed: number) {
  let s = seed >>> 0;
  const next = () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
  return () => next();
}
