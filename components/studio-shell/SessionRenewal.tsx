'use client';

import { useEffect } from 'react';
import { SESSION_RENEW_EVERY_MS } from '@/lib/auth/session-times';

/**
 * Sliding sessions: while someone uses a signed-in page, ask next-auth's session
 * endpoint now and then; it signs the cookie again with a fresh expiry. A session that
 * has ended (signed out everywhere, password reset, workspace suspended) comes back
 * empty, and the page goes to sign-in instead of failing on the next click.
 */
export function SessionRenewal() {
  useEffect(() => {
    let active = true; // opening the page counts as activity
    const markActive = () => {
      active = true;
    };
    const renew = async () => {
      if (!active || document.visibilityState !== 'visible') return;
      active = false;
      try {
        const res = await fetch('/api/auth/session', { cache: 'no-store', credentials: 'same-origin' });
        const session = (await res.json()) as { user?: unknown } | null;
        if (res.ok && !session?.user) window.location.assign(`/signin?callbackUrl=${encodeURIComponent(window.location.pathname + window.location.search)}`);
      } catch {
        // Offline for a moment: try again at the next tick.
        active = true;
      }
    };
    void renew();
    const timer = window.setInterval(() => void renew(), SESSION_RENEW_EVERY_MS);
    const events = ['pointerdown', 'keydown'] as const;
    for (const e of events) window.addEventListener(e, markActive, { passive: true });
    return () => {
      window.clearInterval(timer);
      for (const e of events) window.removeEventListener(e, markActive);
    };
  }, []);
  return null;
}
