import type { Dataset, User, Workspace } from '@/models';

/**
 * Demo step 2: fit the ride logs and store a named mixture model.
 * Filled in by the studio feature; until then the demo has a dataset only.
 */
export async function seedDemoModel(_ctx: { workspace: Workspace; owner: User; dataset: Dataset }): Promise<void> {}
