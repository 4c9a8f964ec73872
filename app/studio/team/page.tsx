import type { Metadata } from 'next';
import { TeamManager } from '@/components/account/team/TeamManager';
import { teamOverview } from '@/lib/accounts/team';
import { pageWorkspace } from '@/lib/auth/page';

export const metadata: Metadata = { title: 'Team' };
export const dynamic = 'force-dynamic';

export default async function TeamPage() {
  const actor = await pageWorkspace('member', '/studio/team');
  const team = await teamOverview(actor.workspace.id);
  return (
    <div className="space-y-6">
      <div>
        <h1 className="text-4xl font-bold">Team</h1>
        <p className="mt-2 text-ink-soft">
          People in {actor.workspace.name}. Members upload, fit and publish; owners also manage the plan, billing and this team. {team.seats.taken} of {team.seats.limit} seat{team.seats.limit === 1 ? '' : 's'} on the {team.seats.plan} plan in use (open invitations hold a seat).
        </p>
      </div>
      <TeamManager
        isOwner={actor.role === 'owner'}
        selfUserId={actor.user.id}
        members={team.members}
        invitations={team.invitations}
        seats={team.seats}
      />
    </div>
  );
}
