'use client';

import Link from 'next/link';
import { usePathname } from 'next/navigation';

export interface NavItem {
  href: string;
  label: string;
}

/** The studio's sections; the current one is marked for eyes and screen readers. */
export function StudioNav({ items }: { items: NavItem[] }) {
  const pathname = usePathname();
  return (
    <nav aria-label="Studio" className="flex flex-wrap items-center gap-1 text-sm font-bold">
      {items.map((item) => {
        const active = pathname === item.href || pathname.startsWith(`${item.href}/`);
        return (
          <Link key={item.href} href={item.href} aria-current={active ? 'page' : undefined} className={`rounded-full px-3 py-1.5 transition ${active ? 'bg-moss-100 text-moss-900' : 'text-ink-soft hover:bg-paper-deep hover:text-ink'}`}>
            {item.label}
          </Link>
        );
      })}
    </nav>
  );
}
