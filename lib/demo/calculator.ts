import type { User, Workspace } from '@/models';

/**
 * Demo step 3: publish the demo model as a calculator.
 * Filled in by the publishing feature; until then nothing is published.
 */
export async function seedDemoCalculator(_ctx: { workspace: Workspace; owner: User }): Promise<void> {}
