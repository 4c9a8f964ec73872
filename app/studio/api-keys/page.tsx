import type { Metadata } from 'next';
import Link from 'next/link';
import { ApiKeysManager } from '@/components/account/ApiKeysManager';
import { StudioPage } from '@/components/studio/StudioPage';
import { listApiKeys } from '@/lib/auth/api-keys';
import { pageWorkspace } from '@/lib/auth/page';

export const metadata: Metadata = { title: 'API keys' };
export const dynamic = 'force-dynamic';

export default async function ApiKeysPage() {
  // A member is sent back to the studio with the owners-only notice (lib/auth/page.ts).
  const actor = await pageWorkspace('owner', '/studio/api-keys');
  const keys = await listApiKeys(actor);
  return (
    <StudioPage
      title="API keys"
      lead={
        <>
          Keys let your own scripts and pipelines use {actor.workspace.name} without a browser: upload tables, fit, publish and read usage through the{' '}
          <Link href="/developers" className="font-bold text-moss-700 hover:underline">
            REST API
          </Link>
          . Each key acts for the whole workspace with the scopes you give it.
        </>
      }
    >
      <ApiKeysManager keys={keys.map((k) => ({ ...k, expiresAt: k.expiresAt?.toISOString() ?? null, lastUsedAt: k.lastUsedAt?.toISOString() ?? null, revokedAt: k.revokedAt?.toISOString() ?? null, createdAt: k.createdAt.toISOString() }))} />
    </StudioPage>
  );
}
