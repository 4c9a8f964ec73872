'use client';
import './globals.css';

/** The last resort, when even the root layout failed: its own document, the app's colours, no chrome that could fail again. */
export default function GlobalError({ retry }: { error: unknown; retry: () => void }) {
  return (
    <html lang="en">
      <body className="min-h-screen bg-paper font-sans text-ink">
        <title>Partwise could not answer</title>
        <main className="mx-auto max-w-lg px-6 py-20">
          <p className="text-sm font-bold uppercase tracking-wide text-moss-600">Something broke</p>
          <h1 className="mt-2 text-3xl font-bold leading-tight">Partwise could not show this page</h1>
          <p className="mt-4 text-ink-soft">Something went wrong on our side. Your saved work is not affected. Please try again in a moment.</p>
          <button type="button" onClick={() => retry()} className="pw-button mt-8">Try again</button>
        </main>
      </body>
    </html>
  );
}
