import Link from 'next/link';
import { Logo } from './Logo';

export function SiteHeader() {
  return (
    <header className="mx-auto flex max-w-6xl items-center justify-between px-6 py-5">
      <Link href="/" aria-label="Partwise home">
        <Logo />
      </Link>
      <nav aria-label="Main" className="flex items-center gap-6 text-sm font-bold text-ink-soft">
        <Link href="/#how" className="hover:text-ink">How it works</Link>
        <Link href="/#pricing" className="hover:text-ink">Pricing</Link>
        <Link href="/signin" className="hover:text-ink">Sign in</Link>
        <Link href="/signup" className="pw-button">Start free</Link>
      </nav>
    </header>
  );
}
