"use client";

/** Opens the browser's print dialog (A4 or Letter, as the printer is set); hidden in print. */
export function PrintButton() {
  return (
    <button
      type="button"
      onClick={() => window.print()}
      className="rounded border border-ink bg-ink px-3 py-1 text-sm font-semibold text-raised"
      data-testid="print-button"
    >
      Print or save as PDF
    </button>
  );
}
