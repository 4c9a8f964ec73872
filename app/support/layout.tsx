import { redirect } from 'next/navigation';
import { StudioHeader } from '@/components/studio-shell/StudioHeader';
import { SupportNav } from '@/components/support/SupportNav';
import { pageActor } from '@/lib/auth/page';

export const dynamic = 'force-dynamic';

/** The signed-in shell around support pages; every page checks for staff itself. */
export default async function SupportLayout({ children }: { children: React.ReactNode }) {
  const actor = await pageActor();
  if (!actor) redirect('/signin?callbackUrl=%2Fsupport');
  return (
    <div className="min-h-screen">
      <StudioHeader user={{ name: actor.user.name, email: actor.user.email }} isStaff={actor.isStaff} role={null} workspaces={[]} currentWorkspaceId={null} />
      {actor.isStaff ? <SupportNav /> : null}
      <main className="mx-auto max-w-6xl px-6 py-8">{children}</main>
    </div>
  );
}
