import { publishNew } from '@/lib/embeds/service';
import { Embed, MixtureModel, type User, type Workspace } from '@/models';

/** Local hosts that may frame the demo calculator: the app itself and the demo host page (scripts/demo-host.ts). */
export const DEMO_HOST_ORIGINS = ['http://localhost:3000', 'http://localhost:4000'];

/**
 * Demo step 3: publish the demo model as a calculator, once. The token is a fresh
 * unguessable one per database; the seed prints the calculator's address.
 */
export async function seedDemoCalculator(ctx: { workspace: Workspace; owner: User }): Promise<void> {
  const existing = await Embed.findOne({ where: { workspaceId: ctx.workspace.id }, order: [['id', 'ASC']] });
  if (existing) {
    console.log(`[partwise] demo calculator already published: ${calculatorUrl(existing.token)}`);
    return;
  }
  const model = await MixtureModel.findOne({ where: { workspaceId: ctx.workspace.id }, order: [['id', 'ASC']] });
  if (!model) return;
  const { embed } = await publishNew({ user: ctx.owner, workspace: ctx.workspace }, { mixtureModelId: model.id, title: 'Which ride group suits you?', allowedOrigins: DEMO_HOST_ORIGINS });
  console.log(`[partwise] demo calculator published: ${calculatorUrl(embed.token)}`);
  console.log('[partwise] see it framed on another origin: npx tsx scripts/demo-host.ts (http://localhost:4000)');
}

function calculatorUrl(token: string): string {
  const base = process.env.NEXTAUTH_URL || `http://localhost:${process.env.PORT || 3000}`;
  return new URL(`/embed/${token}`, base).toString();
}
