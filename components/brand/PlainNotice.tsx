import type { ReactNode } from 'react';
import { PlainFrame } from './PlainFrame';

/** The app's own page for "not here" and "went wrong": the mark, one calm card, ways on. */
export function PlainNotice({ kicker, title, children, actions }: { kicker: string; title: string; children: ReactNode; actions: ReactNode }) {
  return (
    <PlainFrame roomy>
      <div className="pw-card w-full max-w-lg p-8">
        <p className="text-sm font-bold uppercase tracking-wide text-moss-600">{kicker}</p>
        <h1 className="mt-2 text-3xl font-bold leading-tight text-ink">{title}</h1>
        <div className="mt-4 space-y-3 text-ink-soft">{children}</div>
        <div className="mt-8 flex flex-wrap gap-3">{actions}</div>
      </div>
    </PlainFrame>
  );
}
