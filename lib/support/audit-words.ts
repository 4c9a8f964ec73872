/**
 * How the audit trail reads to a person: one label per recorded action and plain
 * words for the detail fields (never raw keys). Pure, so the support pages and tests
 * share it. Actions not listed still show, by their code.
 */
import { formatCount, formatDateTime } from '@/lib/format';

export const ACTION_LABELS: Record<string, string> = {
  'support.embed_disabled': 'Switched off by support',
  'support.embed_enabled': 'Switched back on by support',
  'support.embed_flagged': 'Flagged: answer spike',
  'support.flag_cleared': 'Spike flag cleared',
  'support.workspace_suspended': 'Workspace suspended',
  'support.workspace_restored': 'Workspace restored',
  'support.report_closed': 'Report closed',
  'support.report_reopened': 'Report reopened',
  'embed.publish': 'Published',
  'embed.rotate_token': 'Address replaced (token rotated)',
  'embed.retire': 'Retired',
  'embed.activate_version': 'Served version changed',
  'embed.origins': 'Allowed sites changed',
  'embed.settings': 'Calculator settings changed',
  'embed.insight': 'Answer insight switched on or off',
  'auth.signin': 'Signed in',
  'auth.signin_failed': 'Sign-in failed',
  'account.signed_up': 'Account created',
  'account.email_verified': 'E-mail verified',
  'account.password_reset_requested': 'Password reset asked for',
  'account.password_reset': 'Password reset',
  'account.name_changed': 'Name changed',
  'account.password_changed': 'Password changed',
  'account.deleted': 'Account deleted',
  'account.signup_address_taken': 'Sign-up tried with a taken address',
  'auth.signed_out_everywhere': 'Signed out everywhere',
  'workspace.deleted': 'Workspace deleted',
  'workspace.created': 'Workspace created',
  'team.invited': 'Person invited',
  'team.invitation_accepted': 'Invitation accepted',
  'team.invitation_revoked': 'Invitation withdrawn',
  'team.role_changed': 'Role changed',
  'team.member_removed': 'Person removed',
  'dataset.upload': 'Dataset uploaded',
  'dataset.delete': 'Dataset deleted',
  'model.create': 'Model saved',
  'api_key.create': 'API key made',
  'api_key.revoke': 'API key revoked',
  'api_key.use': 'API key used',
  'api_key.refused': 'API key refused',
  'billing.checkout_started': 'Checkout started',
  'billing.plan_changed': 'Plan changed',
  'billing.change_requested': 'Plan change asked for',
  'billing.cancel_requested': 'Cancellation asked for',
  'billing.resume_requested': 'Cancellation withdrawn',
  'billing.self_service_opened': 'Card and cancellation page opened',
  'billing.subscription_replaced': 'Subscription replaced',
  'billing.subscription_replace_failed': 'Subscription replacement failed',
  'billing.webhook_processed': 'Payment webhook processed',
};

export function actionLabel(action: string): string {
  return ACTION_LABELS[action] ?? action;
}

/** Detail fields worth a line, in this order, with the words a person reads. */
const DETAIL_WORDS: [key: string, words: string][] = [
  ['reason', 'Reason'],
  ['note', 'Note'],
  ['previousReason', 'Earlier reason'],
  ['title', 'Calculator'],
  ['version', 'Version'],
  ['added', 'Sites added'],
  ['removed', 'Sites removed'],
  ['changes', 'Changed'],
  ['lastHour', 'Answers in the last hour'],
  ['usualPerHour', 'Usual answers per hour'],
  ['closedReports', 'Reports closed with it'],
  ['calculators', 'Calculators affected'],
  ['plan', 'Plan'],
  ['from', 'From'],
  ['to', 'To'],
  ['role', 'Role'],
  ['email', 'E-mail'],
  ['type', 'Kind'],
  ['eventType', 'Payment event'],
  ['name', 'Name'],
  ['scopes', 'Scopes'],
  ['expiresAt', 'Expires'],
  ['method', 'Request'],
  ['path', 'Address'],
  ['scope', 'Scope used'],
];

const SETTING_WORDS: Record<string, string> = {
  title: 'title',
  theme: 'theme',
  accentColor: 'accent colour',
  typicalityThreshold: 'unusual-values threshold (percentile)',
  language: 'calculator language',
  insightEnabled: 'answer insight on',
};

function valueWords(key: string, value: unknown): string {
  if (key === 'version' && typeof value === 'number') return `v${value}`;
  if (key === 'expiresAt' && typeof value === 'string') return formatDateTime(value);
  if (key === 'changes' && Array.isArray(value)) {
    return value
      .map((c: { setting?: string; from?: unknown; to?: unknown }) => `${SETTING_WORDS[c.setting ?? ''] ?? c.setting} ${valueWords('', c.from)} → ${valueWords('', c.to)}`)
      .join('; ');
  }
  if (Array.isArray(value)) return value.length ? value.map((v) => valueWords('', v)).join(', ') : 'none';
  if (typeof value === 'number') return Number.isInteger(value) ? formatCount(value) : String(value);
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (value === null || value === undefined || value === '') return '—';
  if (typeof value === 'object') return Object.entries(value as Record<string, unknown>).map(([k, v]) => `${k} ${valueWords('', v)}`).join(', ');
  return String(value);
}

/** The detail of one audit entry as "Words: value · Words: value". */
export function detailSummary(detail: Record<string, unknown>): string {
  return DETAIL_WORDS.filter(([k]) => {
    const v = detail[k];
    return v !== undefined && v !== null && v !== '' && !(Array.isArray(v) && v.length === 0 && (k === 'added' || k === 'removed'));
  })
    .map(([k, words]) => `${words}: ${valueWords(k, detail[k])}`)
    .join(' · ');
}
