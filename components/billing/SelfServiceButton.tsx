'use client';

import { useState } from 'react';
import { billingRequest } from './api';

/** Opens the payment service's own page for the card on file (Partwise never sees card numbers). */
export function SelfServiceButton() {
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<string | null>(null);
  return (
    <div className="text-right">
      <button
        type="button"
        className="pw-button-quiet"
        disabled={pending}
        onClick={async () => {
          setPending(true);
          setError(null);
          try {
            const { url } = await billingRequest<{ url: string }>('/api/billing/self-service', 'POST');
            window.location.assign(url);
          } catch (e) {
            setError((e as Error).message);
            setPending(false);
          }
        }}
      >
        {pending ? 'Opening…' : 'Card and payment settings'}
      </button>
      {error && (
        <p role="alert" className="mt-2 max-w-xs text-sm font-bold text-clay-700">
          {error}
        </p>
      )}
    </div>
  );
}
