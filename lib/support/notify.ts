import { enqueueMail, SUPPORT_ADDRESS } from '@/lib/mail';
import { ownersOf } from './search';

/**
 * E-mails to a workspace's owners when support changes what their visitors see.
 * Plain words: what happened, the reason staff gave, what visitors see now, and how
 * to answer.
 */
function appUrl(path: string): string {
  const base = process.env.NEXTAUTH_URL ?? 'http://localhost:3000';
  return new URL(path, base).toString();
}

const SIGN_OFF = `\n\nIf you think this is a mistake, write to ${SUPPORT_ADDRESS} (replying to this e-mail reaches the same inbox) and tell us what the calculator is for; a person from Partwise support reads every message.\n\n— Partwise support`;

export type SupportNotice =
  | { kind: 'embed-disabled'; title: string; token: string; reason: string }
  | { kind: 'embed-enabled'; title: string; token: string; reason: string }
  | { kind: 'workspace-suspended'; workspaceName: string; reason: string }
  | { kind: 'workspace-restored'; workspaceName: string; reason: string };

export function noticeText(n: SupportNotice): { subject: string; text: string } {
  switch (n.kind) {
    case 'embed-disabled':
      return {
        subject: `Your calculator "${n.title}" has been switched off by Partwise support`,
        text:
          `Partwise support has switched off your calculator "${n.title}".\n\n` +
          `Reason given by support:\n${n.reason}\n\n` +
          `From now on, visitors on the websites that embed it see a short notice that the calculator is not available, and it answers no new values. ` +
          `Your model, versions and usage history are kept; nothing has been deleted.\n\n` +
          `Calculator address: ${appUrl(`/embed/${n.token}`)}` +
          SIGN_OFF,
      };
    case 'embed-enabled':
      return {
        subject: `Your calculator "${n.title}" is answering again`,
        text:
          `Partwise support has switched your calculator "${n.title}" back on. Visitors can use it again from now on.\n\n` +
          `Note from support:\n${n.reason}\n\n` +
          `Calculator address: ${appUrl(`/embed/${n.token}`)}\n\n— Partwise support`,
      };
    case 'workspace-suspended':
      return {
        subject: `The calculators of "${n.workspaceName}" have been suspended`,
        text:
          `Partwise support has suspended every calculator of the workspace "${n.workspaceName}".\n\n` +
          `Reason given by support:\n${n.reason}\n\n` +
          `Visitors now see a notice that the calculators are not available. You can still sign in; your data, models and invoices are unchanged.` +
          SIGN_OFF,
      };
    case 'workspace-restored':
      return {
        subject: `The calculators of "${n.workspaceName}" are answering again`,
        text:
          `Partwise support has lifted the suspension of the workspace "${n.workspaceName}". Calculators that were switched on before answer again.\n\n` +
          `Note from support:\n${n.reason}\n\n— Partwise support`,
      };
  }
}

/** Queue the notice for every owner; returns the addresses written to the outbox. */
export async function notifyOwners(workspaceId: number, notice: SupportNotice): Promise<string[]> {
  const owners = (await ownersOf([workspaceId])).get(workspaceId) ?? [];
  const { subject, text } = noticeText(notice);
  for (const to of owners) await enqueueMail({ to, subject, text, kind: `support-${notice.kind}` });
  return owners;
}
