'use client';

/** Opens the browser's print dialog (the print stylesheet lays the report out for paper). */
export function PrintButton() {
  return (
    <button type="button" className="btn btn-quiet" onClick={() => window.print()}>
      Print
    </button>
  );
}
