'use client';
import { useEffect, useRef, useState } from 'react';
import { chartNumberLocale } from '@/lib/format';
import type { Messages } from './messages';

export interface MembershipRow {
  label: string;
  probability: number;
  color: string;
}

/** Start fetching vega's runtime before the first answer arrives (on first interaction). */
type ChartRuntime = { vega: typeof import('vega'); interpreter: typeof import('vega-interpreter').expressionInterpreter };
let vegaModule: Promise<ChartRuntime> | null = null;
export function preloadChart() {
  vegaModule ??= Promise.all([import('vega'), import('vega-interpreter')]).then(([vega, { expressionInterpreter }]) => ({ vega, interpreter: expressionInterpreter }));
  return vegaModule;
}

/**
 * The horizontal bar chart of membership probabilities, drawn by vega from the spec the
 * server compiled from vega-lite. The same numbers are also a plain list, which is what
 * screen readers get (the SVG is hidden from them), shown to everyone if vega fails.
 */
export function MembershipChart({ spec, rows, formatPercent, texts, locale }: { spec: object; rows: MembershipRow[]; formatPercent: (p: number) => string; texts: Pick<Messages, 'chartFailed' | 'chartList'>; locale: string }) {
  const container = useRef<HTMLDivElement>(null);
  const [failed, setFailed] = useState(false);

  useEffect(() => {
    let view: import('vega').View | null = null;
    let cancelled = false;
    preloadChart()
      .then(async ({ vega, interpreter }) => {
        if (cancelled || !container.current) return;
        // Parsed to an AST and run by the interpreter: no eval, so the page's CSP can forbid it.
        // The axis numbers in the calculator language's marks ("20 %" in German).
        const runtime = vega.parse(spec as import('vega').Spec, { locale: { number: chartNumberLocale(locale) } }, { ast: true });
        view = new vega.View(runtime, { renderer: 'svg', container: container.current, hover: false, expr: interpreter });
        // The bar labels are our own text, so they read exactly like the headline and the list.
        view.data('memberships', rows.map((r) => ({ label: r.label, probability: r.probability, text: formatPercent(r.probability) })));
        await view.runAsync();
        container.current?.setAttribute('data-chart-ready', 'true');
      })
      .catch(() => setFailed(true));
    return () => {
      cancelled = true;
      view?.finalize();
    };
  }, [spec, rows, formatPercent, locale]);

  return (
    <div>
      <div ref={container} aria-hidden="true" className="w-full min-h-[2rem]" data-testid="membership-chart" />
      {failed && <p className="text-sm text-ink-soft dark:text-[#a9b0bf]">{texts.chartFailed}</p>}
      <ul className={failed ? 'mt-2 grid gap-1 text-sm' : 'sr-only'} aria-label={texts.chartList}>
        {rows.map((r) => (
          <li key={r.label} className="flex items-center gap-2">
            <span aria-hidden="true" className="inline-block h-3 w-3 shrink-0 rounded-sm" style={{ backgroundColor: r.color }} />
            <span className="min-w-0 flex-1 break-words">{r.label}</span>
            <span className="font-bold tabular-nums">{formatPercent(r.probability)}</span>
          </li>
        ))}
      </ul>
    </div>
  );
}
