'use client';

import Link from 'next/link';
import { usePathname } from 'next/navigation';

const ITEMS = [
  { href: '/support', label: 'Calculators', match: (p: string) => p === '/support' || p.startsWith('/support/calculators') },
  { href: '/support/audit', label: 'Audit log', match: (p: string) => p.startsWith('/support/audit') },
];

/** Support's own sections, under the signed-in header. */
export function SupportNav() {
  const pathname = usePathname();
  return (
    <div className="border-b border-ink/10 bg-dusk-900 text-white">
      <div className="mx-auto flex max-w-6xl items-center gap-4 px-6 py-2">
        <span className="text-xs font-bold uppercase tracking-widest text-saffron-300">Support desk</span>
        <nav aria-label="Support" className="flex gap-1 text-sm font-bold">
          {ITEMS.map((item) => {
            const active = item.match(pathname);
            return (
              <Link key={item.href} href={item.href} aria-current={active ? 'page' : undefined} className={`rounded-full px-3 py-1 transition ${active ? 'bg-white/15 text-white' : 'text-white/70 hover:text-white'}`}>
                {item.label}
              </Link>
            );
          })}
        </nav>
      </div>
    </div>
  );
}
