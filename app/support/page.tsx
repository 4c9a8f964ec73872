import type { Metadata } from 'next';
import { StaffOnly } from '@/components/support/StaffOnly';
import { SupportConsole } from '@/components/support/SupportConsole';
import { queryObject, searchCalculators, searchQuerySchema } from '@/lib/support';
import { pageSupportActor } from '@/lib/support/page';

export const metadata: Metadata = { title: 'Support' };
export const dynamic = 'force-dynamic';

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };

/** Staff console: the first page of results is rendered here, later ones come from the route. */
export default async function SupportPage({ searchParams }: Props) {
  const actor = await pageSupportActor('/support');
  if (!actor) return <StaffOnly />;
  const parsed = searchQuerySchema.safeParse(queryObject(await searchParams));
  const query = parsed.success ? parsed.data : searchQuerySchema.parse({});
  const initial = await searchCalculators(query);
  return <SupportConsole initial={initial} initialQuery={{ ...query, page: initial.page }} />;
}
