import type { Metadata } from 'next';
import { TeamManager } from '@/components/account/team/TeamManager';
import { teamOverview } from '@/lib/accounts/team';
import { pageWorkspace } from '@/lib/auth/page';

export const metadata: Metadata = { title: 'Team' };
export const dynamic = 'force-dynamic';

function seatLine(s: { plan: string; limit: number; taken: number }): string {
  const plan = `The ${s.plan} plan includes ${s.limit} seat${s.limit === 1 ? '' : 's'}`;
  if (s.taken > s.limit) return `${plan}; ${s.taken} are in use, so no one new can join until the plan grows or someone leaves.`;
  return `${plan}; ${s.taken} in use (open invitations hold a seat).`;
}

export default async function TeamPage() {
  const actor = await pageWorkspace('member', '/studio/team');
  const team = await teamOverview(actor.workspace.id);
  return (
    <div className="space-y-6">
      <div>
        <h1 className="text-4xl font-bold">Team</h1>
        <p className="mt-2 text-ink-soft">
          People in {actor.workspace.name}. Members upload, fit and publish; owners also manage the plan, billing and this team. {seatLine(team.seats)}
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
