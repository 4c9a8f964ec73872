import type { Metadata } from 'next';
import Link from 'next/link';
import { PlainNotice } from '@/components/brand/PlainNotice';

export const metadata: Metadata = { title: 'Page not found', robots: { index: false } };

/** Any address the app does not know, and records (datasets, fits, models…) that are not there. */
export default function NotFound() {
  return (
    <PlainNotice
      kicker="Error 404"
      title="Nothing lives at this address"
      actions={
        <>
          <Link href="/" className="pw-button">Go to the home page</Link>
          <Link href="/studio" className="pw-button-quiet">Open the studio</Link>
        </>
      }
    >
      <p>The address may be mistyped, or what it pointed to was removed or moved to a new address.</p>
      <p>If you followed a link inside Partwise, the item may belong to another workspace than the one you are in.</p>
    </PlainNotice>
  );
}
