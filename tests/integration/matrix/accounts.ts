import type { MatrixRow } from './types';

/**
 * Accounts, workspaces and team. "Current workspace" routes act on the caller's own
 * workspace (A for member/owner, B for outsider); staff belong to none. Ids that do
 * not exist (999999) show that the role check comes before any lookup.
 */
let n = 0;
const unique = (prefix: string) => `${prefix}-${Date.now()}-${++n}@matrix.test`;
const FAKE_TOKEN = 'matrix-token-that-matches-nothing-at-all';
const everyone = (status: number) => ({ visitor: status, member: status, owner: status, staff: status, outsider: status });

export const rows: MatrixRow[] = [
  { file: 'app/api/account/route.ts', method: 'GET', url: () => '/api/account', expect: { ...everyone(200), visitor: 401 } },
  { file: 'app/api/account/sessions/route.ts', method: 'DELETE', url: () => '/api/account/sessions', expect: { ...everyone(200), visitor: 401 }, note: 'signs the caller out everywhere; the next request signs in again' },
  { file: 'app/api/account/route.ts', method: 'PATCH', url: () => '/api/account', body: () => ({ name: '   ' }), expect: { ...everyone(422), visitor: 401 }, note: 'own account only; an empty name shows the session is checked first' },
  {
    file: 'app/api/account/route.ts',
    method: 'DELETE',
    url: () => '/api/account',
    body: () => ({ confirmEmail: 'not-this-account@matrix.test', password: 'matrix-wrong-password' }),
    expect: { ...everyone(422), visitor: 401 },
    note: 'own account only; the typed address must match, so nothing is deleted here',
  },
  {
    file: 'app/api/account/password/route.ts',
    method: 'PUT',
    url: () => '/api/account/password',
    body: () => ({ currentPassword: 'matrix-wrong-password', newPassword: 'matrix-password-3' }),
    expect: { ...everyone(422), visitor: 401 },
    note: 'own account only; the current password decides',
  },
  {
    file: 'app/api/account/signup/route.ts',
    method: 'POST',
    url: () => '/api/account/signup',
    body: () => ({ name: 'Matrix Person', email: unique('signup'), password: 'matrix-password-1', workspaceName: 'Matrix New' }),
    expect: everyone(202),
    note: 'public; never creates staff; same answer for a taken address',
  },
  { file: 'app/api/account/verify/route.ts', method: 'POST', url: () => '/api/account/verify', body: () => ({ token: FAKE_TOKEN }), expect: everyone(404), note: 'public; the token decides' },
  { file: 'app/api/account/verify/resend/route.ts', method: 'POST', url: () => '/api/account/verify/resend', body: () => ({ email: unique('resend') }), expect: everyone(202), note: 'public; same answer for any address' },
  { file: 'app/api/account/password/forgot/route.ts', method: 'POST', url: () => '/api/account/password/forgot', body: () => ({ email: unique('forgot') }), expect: everyone(202), note: 'public; same answer for any address' },
  { file: 'app/api/account/password/reset/route.ts', method: 'POST', url: () => '/api/account/password/reset', body: () => ({ token: FAKE_TOKEN, password: 'matrix-password-2' }), expect: everyone(404), note: 'public; the token decides' },
  { file: 'app/api/workspaces/route.ts', method: 'GET', url: () => '/api/workspaces', expect: { ...everyone(200), visitor: 401 } },
  {
    file: 'app/api/workspaces/route.ts',
    method: 'POST',
    url: () => '/api/workspaces',
    body: () => ({ name: 'Matrix Extra' }),
    expect: { visitor: 401, member: 201, owner: 201, staff: 403, outsider: 201 },
    note: 'staff do not own workspaces',
  },
  {
    file: 'app/api/workspaces/current/route.ts',
    method: 'POST',
    url: () => '/api/workspaces/current',
    body: (w) => ({ workspaceId: w.workspaceId }),
    expect: { visitor: 401, member: 200, owner: 200, staff: 403, outsider: 403 },
  },
  { file: 'app/api/team/route.ts', method: 'GET', url: () => '/api/team', expect: { visitor: 401, member: 200, owner: 200, staff: 403, outsider: 200 }, note: 'outsider sees their own workspace B' },
  {
    file: 'app/api/team/invitations/route.ts',
    method: 'POST',
    url: () => '/api/team/invitations',
    body: () => ({ email: unique('invite'), role: 'member' }),
    expect: { visitor: 401, member: 403, owner: 201, staff: 403, outsider: 201 },
    note: 'owners only; outsider invites into their own workspace B',
  },
  {
    file: 'app/api/team/invitations/[id]/route.ts',
    method: 'DELETE',
    url: () => '/api/team/invitations/999999',
    params: () => ({ id: '999999' }),
    expect: { visitor: 401, member: 403, owner: 404, staff: 403, outsider: 404 },
  },
  { file: 'app/api/team/invitations/accept/route.ts', method: 'GET', url: () => `/api/team/invitations/accept?token=${FAKE_TOKEN}`, expect: everyone(404), note: 'public; the token decides' },
  { file: 'app/api/team/invitations/accept/route.ts', method: 'POST', url: () => '/api/team/invitations/accept', body: () => ({ token: FAKE_TOKEN }), expect: everyone(404), note: 'public; the token decides' },
  {
    file: 'app/api/team/members/[id]/route.ts',
    method: 'PATCH',
    url: () => '/api/team/members/999999',
    params: () => ({ id: '999999' }),
    body: () => ({ role: 'member' }),
    expect: { visitor: 401, member: 403, owner: 404, staff: 403, outsider: 404 },
  },
  {
    file: 'app/api/team/members/[id]/route.ts',
    method: 'DELETE',
    url: () => '/api/team/members/999999',
    params: () => ({ id: '999999' }),
    expect: { visitor: 401, member: 403, owner: 404, staff: 403, outsider: 404 },
  },
];
