'use client';
import { useState } from 'react';

/** A read-only code block with a copy button. */
export function SnippetBox({ label, code }: { label: string; code: string }) {
  const [copied, setCopied] = useState(false);
  const id = `snippet-${label.replace(/\W+/g, '-').toLowerCase()}`;
  return (
    <div>
      <div className="mb-1 flex items-center justify-between gap-3">
        <label htmlFor={id} className="pw-label mb-0">{label}</label>
        <button
          type="button"
          className="pw-button-quiet px-3 py-1"
          onClick={async () => {
            await navigator.clipboard?.writeText(code).catch(() => undefined);
            setCopied(true);
            setTimeout(() => setCopied(false), 2000);
          }}
        >
          {copied ? 'Copied' : 'Copy'}
        </button>
      </div>
      <textarea id={id} readOnly rows={code.split('\n').length} value={code} onFocus={(e) => e.currentTarget.select()} className="pw-input resize-none whitespace-pre font-mono text-xs" spellCheck={false} />
    </div>
  );
}
