/** Words for the support console: audit actions, detail summaries and short tokens (numbers and dates live in lib/format). */
/** Start and end of a token, enough to recognise it without a wall of characters. */
export function shortToken(token: string): string {
  return token.length > 14 ? `${token.slice(0, 8)}…${token.slice(-4)}` : token;
}

export const ACTION_LABELS: Record<string, string> = {
  'support.embed_disabled': 'Switched off by support',
  'support.embed_enabled': 'Switched on by support',
  'support.embed_flagged': 'Flagged: answer spike',
  'support.flag_cleared': 'Spike flag cleared',
  'support.workspace_suspended': 'Workspace suspended',
  'support.workspace_restored': 'Workspace restored',
  'support.report_closed': 'Report closed',
  'support.report_reopened': 'Report reopened',
  'embed.publish': 'Published',
  'embed.rotate_token': 'Token rotated',
  'embed.retire': 'Retired',
  'embed.activate_version': 'Served version changed',
  'embed.origins': 'Allowed sites changed',
  'auth.signin': 'Signed in',
  'auth.signin_failed': 'Sign-in failed',
  'account.signed_up': 'Account created',
  'account.email_verified': 'E-mail verified',
  'account.password_reset_requested': 'Password reset asked for',
  'account.password_reset': 'Password reset',
  'account.name_changed': 'Name changed',
  'account.password_changed': 'Password changed',
  'account.deleted': 'Account deleted',
  'workspace.created': 'Workspace created',
  'workspace.deleted': 'Workspace deleted',
  'team.invited': 'Person invited',
  'team.invitation_accepted': 'Invitation accepted',
  'team.invitation_revoked': 'Invitation withdrawn',
  'team.role_changed': 'Role changed',
  'team.member_removed': 'Person removed',
  'dataset.upload': 'Dataset uploaded',
  'dataset.delete': 'Dataset deleted',
  'model.create': 'Model saved',
  'billing.checkout_started': 'Checkout started',
  'billing.plan_changed': 'Plan changed',
  'billing.change_requested': 'Plan change asked for',
  'billing.cancel_requested': 'Cancellation asked for',
  'billing.resume_requested': 'Cancellation withdrawn',
  'billing.subscription_replaced': 'Subscription replaced',
  'billing.subscription_replace_failed': 'Subscription replacement failed',
  'billing.webhook_processed': 'Payment webhook processed',
};

export function actionLabel(action: string): string {
  return ACTION_LABELS[action] ?? action;
}

/** The few detail fields worth a line in a trail, as "key: value" text. */
export function detailSummary(detail: Record<string, unknown>): string {
  const keys = ['reason', 'note', 'previousReason', 'title', 'version', 'lastHour', 'usualPerHour', 'closedReports', 'calculators', 'plan', 'from', 'to', 'role', 'email', 'type', 'eventType'];
  return keys
    .filter((k) => detail[k] !== undefined && detail[k] !== null && detail[k] !== '')
    .map((k) => `${k}: ${typeof detail[k] === 'object' ? JSON.stringify(detail[k]) : String(detail[k])}`)
    .join(' · ');
}
