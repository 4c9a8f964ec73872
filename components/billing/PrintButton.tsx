'use client';

/** The browser's own print dialog, which also saves the page as a PDF. */
export function PrintButton() {
  return (
    <button type="button" className="pw-button print:hidden" onClick={() => window.print()}>
      Print or save as PDF
    </button>
  );
}
