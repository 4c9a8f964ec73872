import Link from 'next/link';
import { Logo } from '@/components/brand/Logo';
import type { WorkspaceChoice } from '@/lib/accounts/workspaces';
import type { WorkspaceRole } from '@/lib/auth/guard';
import { StudioNav, type NavItem } from './StudioNav';
import { UserMenu } from './UserMenu';
import { WorkspaceSwitcher } from './WorkspaceSwitcher';

/**
 * The signed-in header. Links for owners or staff are hidden from others as a
 * courtesy only: the pages and routes behind them check the role themselves.
 */
export function StudioHeader(props: { user: { name: string; email: string }; isStaff: boolean; role: WorkspaceRole | null; workspaces: WorkspaceChoice[]; currentWorkspaceId: number | null }) {
  const items: NavItem[] = [];
  if (props.role) {
    items.push({ href: '/studio/datasets', label: 'Datasets' }, { href: '/studio/fits', label: 'Fits' }, { href: '/studio/models', label: 'Models' }, { href: '/studio/calculators', label: 'Calculators' }, { href: '/studio/team', label: 'Team' });
    if (props.role === 'owner') items.push({ href: '/studio/billing', label: 'Billing' }, { href: '/studio/api-keys', label: 'API keys' });
  }
  if (props.isStaff) items.push({ href: '/support', label: 'Support' });
  const roleLabel = props.isStaff ? 'Partwise staff' : props.role === 'owner' ? 'Owner of this workspace' : props.role === 'member' ? 'Member of this workspace' : 'No workspace';
  return (
    <header className="border-b border-ink/10 bg-white/70">
      <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-3 gap-y-2 px-4 py-3 sm:gap-x-6 sm:px-6">
        <Link href="/studio" aria-label="Partwise studio overview" className="shrink-0">
          <Logo />
        </Link>
        {/* Narrow screens: the workspace gets a line of its own under the logo and menus. */}
        {props.currentWorkspaceId ? (
          <div className="order-last w-full min-w-0 truncate sm:order-none sm:w-auto">
            <WorkspaceSwitcher workspaces={props.workspaces} currentId={props.currentWorkspaceId} />
          </div>
        ) : null}
        <div className="flex-1 lg:flex-1">
          <StudioNav items={items} />
        </div>
        {/* At phone widths, and where the full row of links is just short of room (lg to xl), the menu shows initials only; the name is inside it. */}
        <div className="min-w-0 max-sm:[&_summary>span:last-child]:hidden max-sm:[&_summary]:pr-1 lg:max-xl:[&_summary>span:last-child]:hidden lg:max-xl:[&_summary]:pr-1">
          <UserMenu name={props.user.name} email={props.user.email} role={roleLabel} />
        </div>
      </div>
    </header>
  );
}
