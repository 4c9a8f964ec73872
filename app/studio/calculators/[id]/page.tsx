import { SUPPORT_ADDRESS } from '@/lib/mail';
import type { Metadata } from 'next';
import { headers } from 'next/headers';
import { notFound } from 'next/navigation';
import { pageWorkspace } from '@/lib/auth/page';
import { AppError } from '@/lib/errors';
import { parseDecimalId } from '@/lib/http/ids';
import { calculatorDetail, type CalculatorDetail } from '@/lib/embeds/studio-queries';
import { SettingsForm } from '@/components/calculators/SettingsForm';
import { SnippetBox } from '@/components/calculators/SnippetBox';
import { StatusPill } from '@/components/calculators/StatusPill';
import { TokenActions } from '@/components/calculators/TokenActions';
import { VersionList } from '@/components/calculators/VersionList';
import { CalculatorTabs } from '@/components/calculators/CalculatorTabs';
import { ErrorNote, Section, StudioPage } from '@/components/studio/StudioPage';
import { formatCount } from '@/lib/format';

export const metadata: Metadata = { title: 'Calculator' };
export const dynamic = 'force-dynamic';

/** Where host pages reach the app: the configured public URL, else this request's host. */
async function appOrigin(): Promise<string> {
  if (process.env.NEXTAUTH_URL) return new URL(process.env.NEXTAUTH_URL).origin;
  const h = await headers();
  return `${h.get('x-forwarded-proto') ?? 'http'}://${h.get('host') ?? 'localhost:3000'}`;
}

const escapeAttr = (s: string) => s.replace(/&/g, '&amp;').replace(/"/g, '&quot;').replace(/</g, '&lt;');

export default async function CalculatorPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  // Decimal digits only: Number() would read "0x6" or "6e0" as 6.
  const embedId = parseDecimalId(id) ?? notFound();
  const actor = await pageWorkspace('member', `/studio/calculators/${id}`);
  let detail: CalculatorDetail;
  try {
    detail = await calculatorDetail(actor.workspace.id, embedId);
  } catch (e) {
    if (e instanceof AppError && e.code === 'not_found') notFound();
    throw e;
  }
  const { embed, versions, models, answersThisMonth } = detail;
  const origin = await appOrigin();
  const title = escapeAttr(embed.title);
  const loaderSnippet = `<div data-partwise-calculator="${embed.token}" data-partwise-title="${title}"></div>\n<script src="${origin}/embed.js" async></script>`;
  const iframeSnippet = `<iframe src="${origin}/embed/${embed.token}" title="${title}"\n  style="width:100%;height:640px;border:0" loading="lazy"></iframe>`;
  const retired = embed.status === 'retired';
  const served = versions.find((v) => v.id === embed.activeVersionId);

  return (
    <StudioPage
      trail={[{ href: '/studio/calculators', label: 'Calculators' }]}
      title={embed.title}
      lead={
        <span className="inline-flex flex-wrap items-center gap-3">
          <StatusPill status={embed.status === 'active' && served?.problem ? 'damaged' : embed.status} />
          <span>{formatCount(answersThisMonth)} answers this month</span>
          {embed.status === 'disabled' && embed.disabledReason && <span>Support&rsquo;s reason: {embed.disabledReason}</span>}
          {embed.status === 'disabled' && (
            <span>
              Questions or a fix to show? Write to{' '}
              <a className="font-bold underline" href={`mailto:${SUPPORT_ADDRESS}?subject=${encodeURIComponent(`Calculator “${embed.title}”`)}`}>
                {SUPPORT_ADDRESS}
              </a>
              ; a person reads every message.
            </span>
          )}
        </span>
      }
    >
      <CalculatorTabs embedId={embed.id} current="overview" />
      {embed.allowedOrigins.length === 0 && !retired && (
        <div role="alert" className="mb-8 rounded-lg border-2 border-clay-500 bg-clay-100 px-5 py-4 text-clay-700" data-testid="no-websites-warning">
          <p className="text-lg font-bold">No website may show this calculator yet</p>
          <p className="mt-1">
            Browsers refuse to show it on any site until you list the website it goes on; for now it appears only in the preview on this page.{' '}
            <a href="#settings" className="font-bold underline">Add your website under Settings</a> (paste the page&rsquo;s address; the site part is kept).
          </p>
        </div>
      )}
      {served?.problem && (
        <div className="mb-8">
          <ErrorNote message={`Version ${served.number}, which this calculator serves, is damaged: ${served.problem}. Visitors see “not available” until you serve another version or publish a new one (Versions, below).`} />
        </div>
      )}
      <div className="grid grid-cols-1 gap-8 lg:grid-cols-[minmax(0,1fr)_minmax(0,26rem)]">
        <div className="space-y-8">
          <Section title="Put it on your website" id="snippet" lead={embed.allowedOrigins.length ? `Paste one of these where the calculator should appear. It shows on ${embed.allowedOrigins.join(', ')} and nowhere else.` : 'Paste one of these where the calculator should appear, once your website is listed under Settings: until then, no website can show it.'}>
            <div className="space-y-4">
              <SnippetBox label="With the loader (sizes itself)" code={loaderSnippet} />
              <SnippetBox label="Plain iframe" code={iframeSnippet} />
              <p className="text-sm text-ink-soft">
                Address: <a className="break-all font-mono text-moss-700 underline" href={`/embed/${embed.token}`} target="_blank" rel="noreferrer">{`${origin}/embed/${embed.token}`}</a>
              </p>
            </div>
          </Section>
          <Section title="Settings" id="settings">
            <SettingsForm embedId={embed.id} disabled={retired} initial={{ title: embed.title, allowedOrigins: embed.allowedOrigins, theme: embed.theme, accentColor: embed.accentColor, typicalityThreshold: embed.typicalityThreshold, language: embed.language }} />
          </Section>
          <Section title="Versions" id="versions">
            <VersionList embedId={embed.id} versions={versions} activeVersionId={embed.activeVersionId} models={models} currentModelId={embed.mixtureModelId} disabled={retired} calculatorStatus={embed.status} />
          </Section>
          <Section title="Address and retirement" id="token">
            <TokenActions embedId={embed.id} retired={retired} />
          </Section>
        </div>
        <Section title="Live preview" id="preview" lead="Exactly what visitors see, served from the current version.">
          <iframe key={`${embed.token}-${embed.activeVersionId}-${embed.theme}-${embed.accentColor}`} src={`/embed/${embed.token}`} title={`Preview of ${embed.title}`} className="h-[44rem] w-full rounded-lg border border-ink/10" />
        </Section>
      </div>
    </StudioPage>
  );
}
