import 'server-only';
import { AppError } from '@/lib/errors';
import { DEFAULT_UNUSUAL_BELOW, parseModelJson } from '@/lib/mixture';
import { isServing, loadServedEmbed, loadServedVersion } from '@/lib/scoring/served';
import { Embed, MixtureModel, Workspace } from '@/models';
import { DEMO_WORKSPACE } from './accounts';
import { chooseExample, type ExampleAnswer } from './example-answer';
import { DEMO_MODEL_NAME } from './model';

/**
 * The landing page's example, worked out from the seeded demo: the version the demo
 * calculator serves (so the numbers are what its scoring route answers), else the demo
 * model itself. Null when there is no demo (a production database is never seeded).
 * Versions never change, so each one's example is worked out once per process.
 */
const memo = new Map<string, ExampleAnswer>();

export async function demoExampleAnswer(): Promise<ExampleAnswer | null> {
  try {
    const workspace = await Workspace.findOne({ where: { slug: DEMO_WORKSPACE.slug }, attributes: ['id'] });
    if (!workspace) return null;
    // The demo calculator is the workspace's first embed (lib/demo/calculator.ts publishes it once).
    const embed = await Embed.findOne({ where: { workspaceId: workspace.id }, order: [['id', 'ASC']], attributes: ['token'] });
    const served = embed ? await loadServedEmbed(embed.token) : null;
    if (served && isServing(served)) {
      try {
        const version = await loadServedVersion(served.activeVersionId!);
        return remember(`version:${version.id}:${served.typicalityThreshold}`, () => chooseExample(version.engine, version.payload.fields, version.payload.clusters, served.typicalityThreshold));
      } catch (e) {
        if (!(e instanceof AppError)) throw e;
      }
    }
    const model = await MixtureModel.findOne({ where: { workspaceId: workspace.id, name: DEMO_MODEL_NAME }, order: [['id', 'ASC']] });
    if (!model) return null;
    return remember(`model:${model.id}:${model.updatedAt.getTime()}`, () => chooseExample(parseModelJson(model.model), model.fields, model.clusters, DEFAULT_UNUSUAL_BELOW));
  } catch (error) {
    // The landing page must render without its example rather than fail.
    console.error('[partwise] the landing example could not be worked out:', error);
    return null;
  }
}

function remember(key: string, work: () => ExampleAnswer): ExampleAnswer {
  let hit = memo.get(key);
  if (!hit) {
    hit = work();
    if (memo.size > 16) memo.clear();
    memo.set(key, hit);
  }
  return hit;
}
