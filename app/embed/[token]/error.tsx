'use client';
import { CalculatorFrame } from '@/components/embed/CalculatorFrame';

/** A fault inside a calculator page: a neutral notice for the host's frame, without the app's chrome. */
export default function CalculatorError({ retry }: { error: unknown; retry: () => void }) {
  return (
    <CalculatorFrame theme="light" accent="#2f6f5e" accentText="#ffffff">
      <div className="py-6 text-center">
        <h1 className="text-xl font-bold">This calculator could not be shown just now</h1>
        <p className="mt-2 text-sm text-ink-soft">Something went wrong on our side. Please try again in a moment.</p>
        <button type="button" onClick={() => retry()} className="mt-4 rounded-full px-5 py-2 text-sm font-bold ring-1 ring-current">
          Try again
        </button>
      </div>
    </CalculatorFrame>
  );
}
