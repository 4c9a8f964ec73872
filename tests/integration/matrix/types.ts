/**
 * Role × route matrix: every route handler under app/api, every exported method,
 * called as each kind of caller, with the status we expect. Each feature area adds
 * its rows in its own file here (see index.ts); matrix.test.ts fails when a route
 * file or method has no row.
 */
export const CALLERS = ['visitor', 'member', 'owner', 'staff', 'outsider'] as const;
/** visitor: not signed in · member/owner: of workspace A · staff: support · outsider: owner of workspace B only. */
export type Caller = (typeof CALLERS)[number];

export type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

export interface World {
  users: Record<Exclude<Caller, 'visitor'>, { id: number; email: string }>;
  workspaceId: number;
  otherWorkspaceId: number;
  datasetId: number;
  fitId: number;
  modelId: number;
  embedId: number;
  embedToken: string;
  versionId: number;
  /** Version 2 of the same calculator, not served. */
  otherVersionId: number;
}

export interface MatrixRow {
  /** Route file relative to the repo root, e.g. `app/api/health/route.ts`. */
  file: string;
  method: Method;
  /** Request path (and query) for this world. */
  url: (w: World) => string;
  /** Dynamic segments passed to the handler as `params`. */
  params?: (w: World) => Record<string, string | string[]>;
  /** JSON body; omit for none. Should be valid, so that the role decides the status. */
  body?: (w: World) => unknown;
  headers?: (w: World) => Record<string, string>;
  /** Expected status per caller (one number or any of several). */
  expect: Record<Caller, number | number[]>;
  /** Callers run in CALLERS order against one shared world: a row that deletes should
   *  accept the statuses seen after an earlier caller's success (e.g. 404). */
  /** Why a row is special, when it is. */
  note?: string;
}

/** Route files that are not ours to matrix (third-party protocol handlers), with why. */
export interface Exemption {
  file: string;
  why: string;
}

/**
 * Key-authenticated routes (/api/v1): the same routes called with workspace API keys
 * instead of sessions (tests/integration/matrix-keys.test.ts). `key`: a key of A with
 * every scope; `workspace B's key`: B's key with every scope, on A's ids.
 */
export const KEY_CALLERS = ['no key', 'session cookie, no key', 'revoked key', 'expired key', 'key without the scope', "workspace B's key", 'key'] as const;
export type KeyCaller = (typeof KEY_CALLERS)[number];

export interface KeyMatrixRow {
  file: string;
  method: Method;
  /** The scope the route asks for; `key without the scope` holds every other one. */
  scope: 'read' | 'fit' | 'publish' | 'score';
  url: (w: World) => string;
  params?: (w: World) => Record<string, string>;
  /** JSON body (valid, so that the key decides the status). */
  body?: (w: World) => unknown;
  /** A raw body with its content type, instead of JSON. */
  raw?: (w: World) => { body: string; contentType: string };
  expect: Record<KeyCaller, number | number[]>;
  note?: string;
}
