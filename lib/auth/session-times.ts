/** Session lifetimes (plain constants: the studio's client code reads them too; see sessions.ts). */
export const SESSION_MAX_AGE_S = 12 * 3600;
/** However active, a sign-in is asked for again after this long. */
export const SESSION_ABSOLUTE_MAX_S = 14 * 24 * 3600;
/** How often an open signed-in page renews its session while someone uses it (ms); well inside SESSION_MAX_AGE_S. */
export const SESSION_RENEW_EVERY_MS = 10 * 60_000;
