'use client';

import Link from 'next/link';
import { usePathname } from 'next/navigation';
import { useEffect, useRef, useState } from 'react';

export interface NavItem {
  href: string;
  label: string;
}

const isActive = (pathname: string, href: string) => pathname === href || pathname.startsWith(`${href}/`);

/**
 * The studio's sections; the current one is marked for eyes and screen readers. Wide
 * screens get one row of links; narrow ones a single "Menu" button that opens the list.
 */
export function StudioNav({ items }: { items: NavItem[] }) {
  const pathname = usePathname();
  const [open, setOpen] = useState(false);
  const panel = useRef<HTMLDivElement>(null);
  const current = items.find((item) => isActive(pathname, item.href));

  // A new page closes the menu; so do Escape and a click elsewhere.
  useEffect(() => setOpen(false), [pathname]);
  useEffect(() => {
    if (!open) return;
    const onKey = (e: KeyboardEvent) => e.key === 'Escape' && setOpen(false);
    const onClick = (e: MouseEvent) => panel.current && !panel.current.contains(e.target as Node) && setOpen(false);
    document.addEventListener('keydown', onKey);
    document.addEventListener('mousedown', onClick);
    return () => {
      document.removeEventListener('keydown', onKey);
      document.removeEventListener('mousedown', onClick);
    };
  }, [open]);

  return (
    <>
      <nav aria-label="Studio" className="hidden items-center gap-1 text-sm font-bold lg:flex">
        {items.map((item) => {
          const active = isActive(pathname, item.href);
          return (
            <Link key={item.href} href={item.href} aria-current={active ? 'page' : undefined} className={`rounded-full px-3 py-1.5 transition ${active ? 'bg-moss-100 text-moss-900' : 'text-ink-soft hover:bg-paper-deep hover:text-ink'}`}>
              {item.label}
            </Link>
          );
        })}
      </nav>
      {items.length > 0 && (
        <div ref={panel} className="relative lg:hidden">
          <button
            type="button"
            aria-expanded={open}
            aria-controls="studio-menu"
            onClick={() => setOpen((o) => !o)}
            className="flex items-center gap-2 rounded-full px-3 py-1.5 text-sm font-bold text-ink ring-1 ring-ink/10 hover:bg-paper-deep"
          >
            <svg aria-hidden="true" width="16" height="16" viewBox="0 0 16 16" className="shrink-0">
              {open ? <path d="M3.5 3.5l9 9m0-9l-9 9" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" /> : <path d="M2.5 4h11M2.5 8h11M2.5 12h11" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />}
            </svg>
            <span>Menu</span>
            {current ? <span className="hidden font-normal text-ink-soft min-[420px]:inline">· {current.label}</span> : null}
          </button>
          {open && (
            <nav id="studio-menu" aria-label="Studio" className="absolute left-0 z-30 mt-2 w-56 rounded-card bg-white p-2 shadow-card ring-1 ring-ink/10">
              <ul className="grid gap-0.5 text-sm font-bold">
                {items.map((item) => {
                  const active = isActive(pathname, item.href);
                  return (
                    <li key={item.href}>
                      <Link href={item.href} onClick={() => setOpen(false)} aria-current={active ? 'page' : undefined} className={`block rounded-lg px-3 py-2 ${active ? 'bg-moss-100 text-moss-900' : 'text-ink hover:bg-paper-deep'}`}>
                        {item.label}
                      </Link>
                    </li>
                  );
                })}
              </ul>
            </nav>
          )}
        </div>
      )}
    </>
  );
}
