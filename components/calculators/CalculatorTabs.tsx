import Link from 'next/link';

export type CalculatorTab = 'overview' | 'insight' | 'compare';

const TABS: { id: CalculatorTab; label: string; path: string }[] = [
  { id: 'overview', label: 'Overview', path: '' },
  { id: 'insight', label: 'Insight', path: '/insight' },
  { id: 'compare', label: 'Compare versions', path: '/compare' },
];

/** The calculator's pages as tabs: plain links, so each tab has its own address. */
export function CalculatorTabs({ embedId, current }: { embedId: number; current: CalculatorTab }) {
  return (
    <nav aria-label="Calculator pages" className="-mt-4 mb-2 border-b border-ink/10">
      <ul className="flex flex-wrap gap-1">
        {TABS.map((t) => (
          <li key={t.id}>
            <Link
              href={`/studio/calculators/${embedId}${t.path}`}
              aria-current={t.id === current ? 'page' : undefined}
              className={`-mb-px inline-block rounded-t-lg border-b-2 px-4 py-2 font-bold ${t.id === current ? 'border-moss-600 text-moss-700' : 'border-transparent text-ink-soft hover:border-ink/20 hover:text-ink'}`}
            >
              {t.label}
            </Link>
          </li>
        ))}
      </ul>
    </nav>
  );
}
