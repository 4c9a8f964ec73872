/** What a workspace API key may do (lib/auth/api-keys.ts). No imports, so browser code can read it too. */
export const API_KEY_SCOPES = ['read', 'fit', 'publish', 'score'] as const;
export type ApiKeyScope = (typeof API_KEY_SCOPES)[number];
