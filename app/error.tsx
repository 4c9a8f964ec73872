'use client';
import Link from 'next/link';
import { useEffect } from 'react';
import { PlainNotice } from '@/components/brand/PlainNotice';

/**
 * An unexpected fault while drawing a page. Nothing about the fault is shown (the server
 * log has it, under the reference); what was saved before stays saved.
 */
export default function PageError({ error, retry }: { error: unknown; retry: () => void }) {
  useEffect(() => {
    console.error(error);
  }, [error]);
  const reference = error instanceof Error && 'digest' in error && typeof error.digest === 'string' ? error.digest : null;
  return (
    <PlainNotice
      kicker="Something broke"
      title="This page could not be shown"
      actions={
        <>
          <button type="button" onClick={() => retry()} className="pw-button">Try again</button>
          <Link href="/" className="pw-button-quiet">Go to the home page</Link>
        </>
      }
    >
      <p>Something went wrong on our side while putting this page together. Your saved work is not affected.</p>
      <p>Trying again usually helps. If it keeps happening, tell Partwise support{reference ? <> and mention the reference <code className="rounded bg-paper-deep px-1.5 py-0.5 text-sm text-ink">{reference}</code></> : null}.</p>
    </PlainNotice>
  );
}
