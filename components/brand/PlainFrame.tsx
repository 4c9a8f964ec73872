import Link from 'next/link';
import type { ReactNode } from 'react';
import { Logo } from './Logo';

/** The frame of pages outside the studio (account pages, notices): the mark linking home, one centred column. */
export function PlainFrame({ children, roomy = false }: { children: ReactNode; roomy?: boolean }) {
  return (
    <div className="flex min-h-screen flex-col">
      <header className="mx-auto w-full max-w-6xl px-6 py-5">
        <Link href="/" aria-label="Partwise home">
          <Logo />
        </Link>
      </header>
      <main className={`flex flex-1 items-start justify-center px-4 pb-16 pt-6 ${roomy ? 'sm:pt-16' : 'sm:pt-12'}`}>{children}</main>
    </div>
  );
}
