import type { Metadata } from 'next';
import { headers } from 'next/headers';
import { notFound } from 'next/navigation';
import { Calculator } from '@/components/embed/Calculator';
import { CalculatorFrame, CalculatorUnavailable } from '@/components/embed/CalculatorFrame';
import { loadCalculatorView } from '@/lib/embeds/calculator-page';

/**
 * The public calculator for one token (what host pages frame). Its CSP frame-ancestors
 * header comes from proxy.ts; the status is read fresh on every request.
 */
export const dynamic = 'force-dynamic';

type Props = { params: Promise<{ token: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { token } = await params;
  const view = await loadCalculatorView(token, undefined);
  return { title: view.state === 'ready' ? view.props.title : view.state === 'missing' ? 'No calculator here' : 'Calculator' };
}

export default async function CalculatorPage({ params, searchParams }: Props) {
  const { token } = await params;
  const host = (await searchParams).host;
  // 'auto' calculators speak the visitor's language, read from the browser's Accept-Language.
  const acceptLanguage = (await headers()).get('accept-language');
  const view = await loadCalculatorView(token, typeof host === 'string' ? host : undefined, acceptLanguage);
  if (view.state === 'missing') notFound();
  if (view.state === 'unavailable') return <CalculatorUnavailable theme={view.theme} token={view.token} hostOrigin={view.hostOrigin} language={view.language} />;
  const { props } = view;
  return (
    <CalculatorFrame theme={props.theme} accent={props.accent} accentText={props.accentText} language={props.language}>
      <Calculator {...props} />
    </CalculatorFrame>
  );
}
