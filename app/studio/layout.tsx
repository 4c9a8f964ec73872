import { redirect } from 'next/navigation';
import { StudioHeader } from '@/components/studio-shell/StudioHeader';
import { listMyWorkspaces } from '@/lib/accounts/workspaces';
import { pageActor, pageCurrentWorkspace } from '@/lib/auth/page';

export const dynamic = 'force-dynamic';

/** The signed-in shell around every studio page. Each page still checks its own role. */
export default async function StudioLayout({ children }: { children: React.ReactNode }) {
  const actor = await pageActor();
  if (!actor) redirect('/signin?callbackUrl=%2Fstudio');
  const [current, workspaces] = await Promise.all([pageCurrentWorkspace(), listMyWorkspaces(actor.user.id)]);
  // Support staff have no workspace of their own: their place is the support console.
  if (actor.isStaff && !current) redirect('/support');
  return (
    <div className="min-h-screen">
      <div className="print:hidden">
        <StudioHeader user={{ name: actor.user.name, email: actor.user.email }} isStaff={actor.isStaff} role={current?.role ?? null} workspaces={workspaces} currentWorkspaceId={current?.workspace.id ?? null} />
      </div>
      <main className="mx-auto max-w-6xl px-4 py-8 sm:px-6">{children}</main>
    </div>
  );
}
