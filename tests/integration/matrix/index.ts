import type { Exemption, MatrixRow } from './types';
import * as foundation from './foundation';
import * as studio from './studio';
import * as embeds from './embeds';
import * as accounts from './accounts';
import * as billing from './billing';
import * as support from './support';
import * as insight from './insight';
import * as api from './api';

/** Every area's rows. A new area adds `import * as area from './area'` and lists it here. */
const areas: { rows: MatrixRow[]; exemptions?: Exemption[] }[] = [foundation, embeds, accounts, studio, billing, support, insight, api];

/** Rows called with API keys (matrix-keys.test.ts). */
export const allKeyRows = api.keyRows;

export const allRows: MatrixRow[] = areas.flatMap((a) => a.rows);
export const allExemptions: Exemption[] = areas.flatMap((a) => a.exemptions ?? []);
